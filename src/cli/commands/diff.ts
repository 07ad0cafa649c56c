/**
 * `looprig diff FILE [--from REV] [--to REV]` and `looprig diff OLD.yaml NEW.yaml`: what a change
 * to a plant file does to its loop (see diff-report.ts), printed as text, `--json`, `--markdown`
 * (a pull-request comment), and `--svg OUT`.
 *
 * Revisions are read with git (git-revision.ts). A file renamed between the two revisions is
 * followed when git sees the rename (staged or committed); `--from REV:OLDPATH` names the old
 * path explicitly. A file absent at the old revision is an added file (no "before").
 *
 * Exit status: 0 no requirement newly fails; 1 one does; 2 bad arguments, a git problem, or
 * either version invalid (the message says which).
 */
import { resolve } from 'node:path';
import { formatDiagnostic, loadPlant } from '../../model/index.js';
import type { PlantSpec } from '../../model/types.js';
import { StructureUnavailable } from '../../tune/index.js';
import { diffJson, diffMarkdown, diffText } from '../diff-print.js';
import { diffReport, diffSide, type DiffSide } from '../diff-report.js';
import { diffSvg } from '../diff-svg.js';
import { enforceFileBudget, LIMIT_OPTIONS } from '../budget-check.js';
import { UserError } from '../errors.js';
import { topLevelKeys } from '../find-plant-files.js';
import { readAtRevision, renamedFrom, repoFileOf, verifyRevision, type RevisionText } from '../git-revision.js';
import { EncodingError, type Io } from '../io.js';
import { toJson } from '../json.js';
import { parseCommandArgs } from '../parse-command.js';

export const DIFF_USAGE = `Usage: looprig diff FILE [--from REV] [--to REV] [options]
       looprig diff OLD.yaml NEW.yaml [options]

What a change to a plant file does to its loop: the fields that changed (gains with their form,
model parameters, actuator and sensor, requirements, trial), then the loop before -> after on its
trial: every metric and margin with the signed change, the requirement verdicts (newly failing
and newly passing ones marked, worst cases over the uncertainty ranges when the file asks for
them), and the switch rehearsal from the old gains to the new at a steady instant.

FILE is read at two git revisions: --from (default HEAD) and --to (default: the working tree).
A renamed file is followed when git sees the rename; --from REV:OLDPATH names the old path.
A file absent at --from is new: it has no "before".

Options:
  --from REV[:OLDPATH]  the old revision (default HEAD; in CI e.g. --from origin/main)
  --to REV              the new revision (default: the file in the working tree)
  --json                one JSON document on stdout
  --markdown            a compact Markdown report (for a pull-request comment)
  --svg OUT             write both trials, both controller outputs and the rehearsal to OUT
  --no-limits           run even when a version is over the resource budget
  -h, --help            show this text

Exit status: 0 no requirement newly fails, 1 a requirement newly fails (or could newly not be
evaluated), 2 bad arguments, a git problem, or an invalid version of the file (named).
`;

interface DiffArgs {
  files: string[];
  from: string | null;
  to: string | null;
  json: boolean;
  markdown: boolean;
  svg: string | null;
  /** --no-limits: the resource budget lifted. */
  noLimits: boolean;
}

function parseDiffArgs(args: readonly string[]): DiffArgs | 'help' {
  const { values, positionals } = parseCommandArgs('diff', args, {
    from: { type: 'string' },
    to: { type: 'string' },
    json: { type: 'boolean' },
    markdown: { type: 'boolean' },
    svg: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
    ...LIMIT_OPTIONS,
  });
  if (values.help) return 'help';
  if (positionals.length === 0) throw new UserError('diff: missing FILE (or OLD.yaml NEW.yaml)');
  if (positionals.length > 2) throw new UserError(`diff: one FILE or two files expected, got ${positionals.length}`);
  if (positionals.length === 2 && (values.from !== undefined || values.to !== undefined)) {
    throw new UserError('diff: --from and --to read one FILE at two revisions; with two files give neither');
  }
  if (values.json === true && values.markdown === true) throw new UserError('diff: --json and --markdown exclude each other');
  for (const [flag, v] of [['from', values.from], ['to', values.to]] as const) {
    if (v !== undefined && (v === '' || v.startsWith('-'))) throw new UserError(`diff: --${flag} needs a revision, got '${v}'`);
  }
  return {
    files: positionals,
    from: values.from ?? null,
    to: values.to ?? null,
    json: values.json === true,
    markdown: values.markdown === true,
    svg: values.svg ?? null,
    noLimits: values['no-limits'] === true,
  };
}

/** The file on disk; null text when it does not exist. */
function readDisk(io: Io, path: string): RevisionText {
  try {
    return { label: path, text: io.readText(path) };
  } catch (error) {
    if (error instanceof EncodingError) throw new UserError(`diff: ${error.message}`);
    const code = (error as { code?: string }).code;
    if (code === 'ENOENT') return { label: path, text: null };
    throw new UserError(`diff: cannot read ${path}: ${code === 'EISDIR' ? 'is a folder' : (error as Error).message}`);
  }
}

/** The two versions of FILE from git, following a rename (or the explicit REV:OLDPATH). */
function readRevisions(io: Io, file: string, fromArg: string | null, to: string | null): { before: RevisionText; after: RevisionText; notes: string[] } {
  const cwd = resolve('.');
  const repo = repoFileOf(io, file, cwd);
  const colon = fromArg === null ? -1 : fromArg.indexOf(':', 1);
  const from = fromArg === null ? 'HEAD' : colon > 0 ? fromArg.slice(0, colon) : fromArg;
  const oldPath = colon > 0 ? fromArg!.slice(colon + 1) : null;
  verifyRevision(io, repo, from, '--from');
  if (to !== null) verifyRevision(io, repo, to, '--to');
  const notes: string[] = [];
  const after = to === null ? readDisk(io, file) : readAtRevision(io, repo, to);
  if (after.text === null) {
    throw new UserError(`diff: ${to === null ? `${file} does not exist in the working tree` : `${file} does not exist at ${to} (${after.label})`}`);
  }
  let before: RevisionText;
  if (oldPath !== null) {
    before = readAtRevision(io, repo, from, repoFileOf(io, oldPath, cwd).path);
    if (before.text === null) throw new UserError(`diff: --from ${fromArg}: no such file at ${from}`);
  } else {
    before = readAtRevision(io, repo, from);
    if (before.text === null) {
      const old = renamedFrom(io, repo, from, to);
      if (old !== null) {
        before = readAtRevision(io, repo, from, old);
        notes.push(`renamed: ${old} at ${from} -> ${repo.path}`);
      } else notes.push(`the file is new: it does not exist at ${from}`);
    }
  }
  return { before, after, notes };
}

/** Load one version; a bad one prints its diagnostics (as LABEL:LINE:COL) and is exit 2, named. */
function loadVersion(io: Io, side: 'old' | 'new', v: RevisionText): PlantSpec | null {
  if (v.text === null) return null;
  const bad = (why: string): never => {
    throw new UserError(`diff: the ${side} version (${v.label}) is not a valid plant file${why}`);
  };
  const loaded = loadPlant(v.text, v.label);
  const errors = loaded.diagnostics.filter((d) => d.severity === 'error').length;
  if (errors > 0 || loaded.plant === undefined) {
    // Another YAML file (a CI config, say) gets one line instead of a list of missing fields;
    // parsed only on failure, a YAML parse being a large share of a diff's time.
    const keys = topLevelKeys(v.text);
    if (keys !== null && !(keys.includes('model') && keys.includes('loop'))) {
      io.err(`${v.label}:1:1: not a plant file: a plant file is a YAML mapping with top-level 'model' and 'loop'\n`);
      bad('');
    }
  }
  for (const d of loaded.diagnostics) io.err(`${formatDiagnostic(d, v.text, v.label)}\n`);
  if (errors > 0 || loaded.plant === undefined) bad(errors > 0 ? ` (${errors} error${errors === 1 ? '' : 's'} above)` : '');
  return loaded.plant!;
}

function evaluateSide(side: 'old' | 'new', v: RevisionText, plant: PlantSpec | null): DiffSide {
  try {
    return diffSide(v.label, v.text, plant);
  } catch (error) {
    // A structure this plant cannot support (e.g. a Smith predictor on an integrating plant).
    if (error instanceof StructureUnavailable) throw new UserError(`diff: the ${side} version (${v.label}): ${error.message}`);
    throw error;
  }
}

/** `looprig diff ...` */
export async function diffCommand(args: readonly string[], io: Io): Promise<number> {
  const a = parseDiffArgs(args);
  if (a === 'help') {
    io.out(DIFF_USAGE);
    return 0;
  }
  let read: { before: RevisionText; after: RevisionText; notes: string[] };
  if (a.files.length === 2) {
    const before = readDisk(io, a.files[0]);
    const after = readDisk(io, a.files[1]);
    for (const v of [before, after]) if (v.text === null) throw new UserError(`diff: cannot read ${v.label}: no such file`);
    read = { before, after, notes: [] };
  } else {
    read = readRevisions(io, a.files[0], a.from, a.to);
  }
  const oldPlant = loadVersion(io, 'old', read.before);
  const newPlant = loadVersion(io, 'new', read.after);
  // Each version's runs within the resource budget (refused before any run, as run and check do).
  for (const [plant, v] of [[oldPlant, read.before], [newPlant, read.after]] as const) {
    if (plant !== null) enforceFileBudget({ plant, text: v.text! }, v.label, io, { noLimits: a.noLimits });
  }
  const report = diffReport(evaluateSide('old', read.before, oldPlant), evaluateSide('new', read.after, newPlant));
  report.notes.unshift(...read.notes);
  if (a.svg !== null) {
    try {
      io.writeText(a.svg, diffSvg(report));
    } catch (error) {
      throw new UserError(`diff: cannot write ${a.svg}: ${(error as Error).message}`);
    }
    report.notes.push(`plot written to ${a.svg}`);
  }
  const code = report.newlyFailing > 0 ? UserError.FAIL : 0;
  io.out(a.json ? toJson(diffJson(report, code)) : a.markdown ? diffMarkdown(report) : diffText(report));
  return code;
}
