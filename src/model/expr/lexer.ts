/**
 * Lexer of the expression language. Offsets are positions in the expression string.
 */

export type TokenKind = 'num' | 'name' | 'op' | 'lparen' | 'rparen' | 'comma' | 'question' | 'colon' | 'end';

export interface Token {
  kind: TokenKind;
  /** Operator text, name, or number source. */
  text: string;
  /** Numeric value for 'num'. */
  value: number;
  start: number;
  end: number;
}

export interface LexError {
  message: string;
  start: number;
  end: number;
}

const OPS2 = ['<=', '>=', '==', '!=', '&&', '||'];
const OPS1 = '+-*/^<>!';

function isDigit(c: string): boolean {
  return c >= '0' && c <= '9';
}
function isNameStart(c: string): boolean {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c === '_';
}
function isNameChar(c: string): boolean {
  return isNameStart(c) || isDigit(c);
}

/** Split `src` into tokens; stops at the first character it cannot read. */
export function lex(src: string): { tokens: Token[]; error: LexError | null } {
  const tokens: Token[] = [];
  let i = 0;
  const n = src.length;
  while (i < n) {
    const c = src[i];
    if (c === ' ' || c === '\t' || c === '\n' || c === '\r') {
      i++;
      continue;
    }
    const start = i;
    if (isDigit(c) || (c === '.' && i + 1 < n && isDigit(src[i + 1]))) {
      while (i < n && isDigit(src[i])) i++;
      if (src[i] === '.') {
        i++;
        while (i < n && isDigit(src[i])) i++;
      }
      if (src[i] === 'e' || src[i] === 'E') {
        let j = i + 1;
        if (src[j] === '+' || src[j] === '-') j++;
        if (!isDigit(src[j] ?? '')) {
          return { tokens, error: { message: `malformed number '${src.slice(start, j)}'`, start, end: j } };
        }
        i = j;
        while (i < n && isDigit(src[i])) i++;
      }
      if (i < n && isNameStart(src[i])) {
        let j = i;
        while (j < n && isNameChar(src[j])) j++;
        return {
          tokens,
          error: { message: `malformed number '${src.slice(start, j)}' (write 2*x, not 2x)`, start, end: j },
        };
      }
      const text = src.slice(start, i);
      tokens.push({ kind: 'num', text, value: Number(text), start, end: i });
      continue;
    }
    if (isNameStart(c)) {
      while (i < n && isNameChar(src[i])) i++;
      tokens.push({ kind: 'name', text: src.slice(start, i), value: NaN, start, end: i });
      continue;
    }
    const two = src.slice(i, i + 2);
    if (OPS2.includes(two)) {
      tokens.push({ kind: 'op', text: two, value: NaN, start, end: i + 2 });
      i += 2;
      continue;
    }
    if (OPS1.includes(c)) {
      tokens.push({ kind: 'op', text: c, value: NaN, start, end: i + 1 });
      i++;
      continue;
    }
    const single: Record<string, TokenKind> = { '(': 'lparen', ')': 'rparen', ',': 'comma', '?': 'question', ':': 'colon' };
    const kind = single[c];
    if (kind !== undefined) {
      tokens.push({ kind, text: c, value: NaN, start, end: i + 1 });
      i++;
      continue;
    }
    let hint = '';
    if (c === '=') hint = " (use '==' to compare)";
    else if (c === '&' || c === '|') hint = ` (use '${c}${c}')`;
    else if (c === '*' || c === '%') hint = '';
    return { tokens, error: { message: `unexpected character '${c}'${hint}`, start, end: i + 1 } };
  }
  tokens.push({ kind: 'end', text: '', value: NaN, start: n, end: n });
  return { tokens, error: null };
}
