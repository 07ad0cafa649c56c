/**
 * What one source file imports and which process-level globals it touches, read from the syntax
 * tree of the TypeScript compiler (not from the text), so a comment or a string that mentions
 * `import(` or `console.` is not taken for code, and every import form is seen.
 * Names are not resolved through scopes: a local variable called `process` or `console` counts as
 * the global (in the core, name it otherwise).
 */
import ts from 'typescript';

/** How a module is named in the source. */
export type ImportForm =
  | 'import' // import x from 'm'; import 'm'; import type { T } from 'm'
  | 'export-from' // export * from 'm'; export { x } from 'm'; export type { T } from 'm'
  | 'import-require' // import x = require('m')
  | 'dynamic-import' // import('m')
  | 'require' // require('m')
  | 'import-type' // let x: import('m').T
  | 'reference'; // /// <reference path="m" />

/** One module reference. `spec` is null when it is computed at run time (cannot be checked). */
export interface ImportFact {
  spec: string | null;
  form: ImportForm;
  /** 1-based position of the specifier (or of the call when computed). */
  line: number;
  col: number;
}

/** A use of a process-level facility the core must not touch. */
export type GlobalUse = 'process' | 'console' | 'eval' | 'new Function';

export interface GlobalUseFact {
  use: GlobalUse;
  line: number;
  col: number;
}

export interface SourceFacts {
  imports: ImportFact[];
  globals: GlobalUseFact[];
}

/** Facts of one file; `fileName` only selects the parser's dialect (.tsx allows JSX). */
export function sourceFacts(fileName: string, text: string): SourceFacts {
  const kind = fileName.endsWith('.tsx') ? ts.ScriptKind.TSX : ts.ScriptKind.TS;
  const sf = ts.createSourceFile(fileName, text, ts.ScriptTarget.Latest, true, kind);
  const imports: ImportFact[] = [];
  const globals: GlobalUseFact[] = [];
  const at = (node: ts.Node): { line: number; col: number } => {
    const p = sf.getLineAndCharacterOfPosition(node.getStart(sf));
    return { line: p.line + 1, col: p.character + 1 };
  };
  const addImport = (form: ImportForm, specNode: ts.Node | undefined, where: ts.Node): void => {
    const literal = specNode !== undefined && (ts.isStringLiteral(specNode) || ts.isNoSubstitutionTemplateLiteral(specNode));
    imports.push({ spec: literal ? (specNode as ts.StringLiteralLike).text : null, form, ...at(literal ? specNode : where) });
  };

  for (const ref of sf.referencedFiles) {
    const p = sf.getLineAndCharacterOfPosition(ref.pos);
    imports.push({ spec: ref.fileName, form: 'reference', line: p.line + 1, col: p.character + 1 });
  }

  const visit = (node: ts.Node): void => {
    if (ts.isImportDeclaration(node)) addImport('import', node.moduleSpecifier, node);
    else if (ts.isExportDeclaration(node) && node.moduleSpecifier !== undefined) addImport('export-from', node.moduleSpecifier, node);
    else if (ts.isImportEqualsDeclaration(node) && ts.isExternalModuleReference(node.moduleReference)) {
      addImport('import-require', node.moduleReference.expression, node);
    } else if (ts.isImportTypeNode(node)) {
      const arg = ts.isLiteralTypeNode(node.argument) ? node.argument.literal : undefined;
      addImport('import-type', arg, node);
    } else if (ts.isCallExpression(node)) {
      if (node.expression.kind === ts.SyntaxKind.ImportKeyword) addImport('dynamic-import', node.arguments[0], node);
      else if (ts.isIdentifier(node.expression) && node.expression.text === 'require') addImport('require', node.arguments[0], node);
      else if (globalName(node.expression) === 'Function') globals.push({ use: 'new Function', ...at(node) });
    } else if (ts.isNewExpression(node) && globalName(node.expression) === 'Function') {
      globals.push({ use: 'new Function', ...at(node) });
    } else if (ts.isIdentifier(node) && isValueReference(node)) {
      const name = node.text;
      if (name === 'process' || name === 'console' || name === 'eval') globals.push({ use: name, ...at(node) });
    } else if (ts.isPropertyAccessExpression(node) || ts.isElementAccessExpression(node)) {
      // globalThis.process, globalThis['console'] ...: the same globals reached through globalThis.
      const name = globalName(node);
      if (name === 'process' || name === 'console' || name === 'eval') globals.push({ use: name, ...at(node) });
    }
    ts.forEachChild(node, visit);
  };
  visit(sf);
  return { imports, globals };
}

/** `X`, `globalThis.X` or `globalThis['X']` -> 'X'; anything else -> null. */
function globalName(e: ts.Expression): string | null {
  while (ts.isParenthesizedExpression(e)) e = e.expression;
  if (ts.isIdentifier(e)) return e.text;
  const onGlobal = (obj: ts.Expression): boolean => ts.isIdentifier(obj) && (obj.text === 'globalThis' || obj.text === 'global' || obj.text === 'window');
  if (ts.isPropertyAccessExpression(e) && onGlobal(e.expression)) return e.name.text;
  if (ts.isElementAccessExpression(e) && onGlobal(e.expression) && ts.isStringLiteralLike(e.argumentExpression)) return e.argumentExpression.text;
  return null;
}

/**
 * True when the identifier names a value in an expression: not a property name (`job.process`,
 * `{ console: 1 }`), not the name of a declaration, not a type, not an import/export name.
 */
function isValueReference(id: ts.Identifier): boolean {
  const p = id.parent;
  if (ts.isShorthandPropertyAssignment(p)) return true; // { process } passes the value on
  if ((p as { name?: ts.Node }).name === id) return false; // property access/assignment, declarations
  if (ts.isQualifiedName(p) || ts.isTypeReferenceNode(p) || ts.isTypeQueryNode(p)) return false;
  if (ts.isImportSpecifier(p) || ts.isExportSpecifier(p) || ts.isImportClause(p)) return false;
  if (ts.isLabeledStatement(p) || ts.isBreakOrContinueStatement(p)) return false;
  return true;
}
