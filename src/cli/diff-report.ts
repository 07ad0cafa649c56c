/**
 * What a change to a plant file does to its loop: the file's changed fields, every figure of the
 * loop before and after with its signed change, the requirement verdicts with those that newly
 * fail or newly pass, and the switch rehearsal from the old gains to the new. Figures come from
 * diff-evaluation.ts only (the code path of `run` and `check`); this file compares and labels.
 */
import { applyStructure } from '../control/index.js';
import type { GainSet, PlantSpec } from '../model/types.js';
import { rehearseSwitch, type Rehearsal } from '../tune/index.js';
import type { CheckRow } from './check-plant.js';
import { evaluateRevision, type RevisionEvaluation } from './diff-evaluation.js';
import { num } from './format.js';
import { plantChanges, type FieldChange } from './plant-changes.js';

/** One side of the comparison. `plant` null: the file does not exist there (added file). */
export interface DiffSide {
  /** `REV:PATH`, or the path of the file read from disk. */
  label: string;
  text: string | null;
  plant: PlantSpec | null;
  evaluation: RevisionEvaluation | null;
}

/** One figure before and after. NaN: not reached, not available, or no such side. */
export interface FigureDelta {
  name: string;
  unit: string;
  before: number;
  after: number;
  /** after − before (NaN when either is not a finite number, or the unit changed). */
  change: number;
  note: string;
  /** The unit of `before` (the old file's, which may differ from `unit`, the new file's). */
  beforeUnit: string;
}

/** How a requirement's verdict moved. A failing verdict is 'fail' or 'n/a' (as in check). */
export type VerdictChange = 'newly fails' | 'newly passes' | 'still fails' | 'still passes' | 'new, passes' | 'removed';

/** One requirement row (nominal or worst case) before and after. */
export interface VerdictDelta {
  requirement: string;
  scope: CheckRow['scope'];
  kind: CheckRow['kind'];
  unit: string;
  before: CheckRow | null;
  after: CheckRow | null;
  change: VerdictChange;
}

/** The switch rehearsal on the new file's plant and trial, from the old running gains to the new. */
export interface DiffRehearsal {
  from: GainSet;
  to: GainSet;
  run: Rehearsal;
}

export interface DiffReport {
  before: DiffSide;
  after: DiffSide;
  changes: FieldChange[];
  metrics: FigureDelta[];
  margins: FigureDelta[];
  verdicts: VerdictDelta[];
  rehearsal: DiffRehearsal | null;
  /** Why there is no rehearsal, or what it assumed. */
  rehearsalNote: string;
  notes: string[];
  /** Requirement rows that newly fail (the exit status is 1 when there is any). */
  newlyFailing: number;
}

const failing = (r: CheckRow): boolean => r.status !== 'pass';

function verdictChange(before: CheckRow | null, after: CheckRow | null): VerdictChange {
  if (after === null) return 'removed';
  // A requirement the change adds (or a file it adds) that fails is a new failure of the change.
  if (before === null) return failing(after) ? 'newly fails' : 'new, passes';
  if (failing(after)) return failing(before) ? 'still fails' : 'newly fails';
  return failing(before) ? 'newly passes' : 'still passes';
}

function delta(name: string, unit: string, before: number, after: number, note: string, beforeUnit: string = unit): FigureDelta {
  // Nothing is converted: figures in two different units have no change to show (a label added
  // to a file that had none is the same figure).
  const same = beforeUnit === unit || beforeUnit === '' || unit === '';
  const change = same && Number.isFinite(before) && Number.isFinite(after) ? after - before : NaN;
  const unitNote = same ? '' : `unit ${beforeUnit || '(none)'} -> ${unit || '(none)'}, no change computed`;
  return { name, unit, before, after, change, note: [note, unitNote].filter((x) => x).join('; '), beforeUnit };
}

/** The setpoint step a step figure comes from, when the trial has more than one ('' otherwise). */
function stepNote(e: RevisionEvaluation | null, i: number): string {
  const at = e?.metrics[i].stepAt ?? null;
  return at !== null && e!.check.nominal.metrics.steps.length > 1 ? `worst step at ${num(at, 6)} s` : '';
}

/** Two sides' notes: once when they agree, else each with its side. */
function sidesNote(before: string, after: string): string {
  if (before === after) return after;
  return [before ? `before: ${before}` : '', after ? `after: ${after}` : ''].filter((s) => s).join('; ');
}

function sameGains(a: GainSet, b: GainSet): boolean {
  return (Object.keys(a) as (keyof GainSet)[]).every((k) => Object.is(a[k], b[k]));
}

/** The structure a controller runs, for telling whether a rehearsal can switch between two. */
function structureOf(p: PlantSpec): string {
  const c = p.loop.controller;
  return c.named ?? (c.extension !== undefined ? c.extension.kind : 'plain');
}

/** Evaluate one side (null when the file is absent there). */
export function diffSide(label: string, text: string | null, plant: PlantSpec | null): DiffSide {
  return { label, text, plant, evaluation: plant === null ? null : evaluateRevision(plant) };
}

/** Compare two evaluated sides. `after` must exist. */
export function diffReport(before: DiffSide, after: DiffSide): DiffReport {
  const a = before.evaluation;
  const b = after.evaluation!;
  const notes: string[] = [];
  // Each figure says where it comes from: the worst setpoint step (trials with several), the
  // operating point and frequency (check's note), or why it is not available.
  const metrics = b.metrics.map((m, i) => delta(m.name, m.unit, a?.metrics[i].value ?? NaN, m.value, sidesNote(stepNote(a, i), stepNote(b, i)), a?.metrics[i].unit ?? m.unit));
  const margins = b.margins.map((m, i) => {
    const o = a?.margins[i];
    return delta(m.name, m.unit, o?.available ? o.value : NaN, m.available ? m.value : NaN, sidesNote(o?.note ?? '', m.note), o?.unit ?? m.unit);
  });

  const key = (r: CheckRow): string => `${r.requirement}/${r.scope}`;
  const beforeRows = new Map((a?.check.rows ?? []).map((r) => [key(r), r]));
  const afterRows = new Map(b.check.rows.map((r) => [key(r), r]));
  const verdicts: VerdictDelta[] = [];
  for (const r of b.check.rows) {
    const o = beforeRows.get(key(r)) ?? null;
    verdicts.push({ requirement: r.requirement, scope: r.scope, kind: r.kind, unit: r.unit, before: o, after: r, change: verdictChange(o, r) });
  }
  for (const o of a?.check.rows ?? []) {
    if (!afterRows.has(key(o))) verdicts.push({ requirement: o.requirement, scope: o.scope, kind: o.kind, unit: o.unit, before: o, after: null, change: 'removed' });
  }

  if (before.plant !== null && after.plant !== null) {
    const t0 = JSON.stringify(before.plant.loop.trial);
    if (t0 !== JSON.stringify(after.plant.loop.trial)) notes.push('the trial changed: each side runs its own revision\'s trial');
  }
  for (const n of a?.check.notes ?? []) notes.push(`before: ${n}`);
  for (const n of b.check.notes) notes.push(`after: ${n}`);

  let rehearsal: DiffRehearsal | null = null;
  let rehearsalNote = '';
  if (before.plant === null) rehearsalNote = 'no switch rehearsal: the file is new (no old gains)';
  else if (structureOf(before.plant) !== structureOf(after.plant!)) {
    rehearsalNote = `no switch rehearsal: the structure changes (${structureOf(before.plant)} -> ${structureOf(after.plant!)}); a rehearsal switches gains inside one structure`;
  } else {
    const cb = before.plant.loop.controller;
    const ca = after.plant!.loop.controller;
    const from = applyStructure(cb.structure, cb.gains);
    const to = applyStructure(ca.structure, ca.gains);
    if (sameGains(from, to)) rehearsalNote = 'no switch rehearsal: the controller gains did not change';
    else {
      rehearsal = { from, to, run: rehearseSwitch(after.plant!, from, to) };
      rehearsalNote = 'on the new file\'s plant and trial: the old gains run until the switch, then the new gains';
    }
  }
  return {
    before,
    after,
    changes: plantChanges(before.text, after.text),
    metrics,
    margins,
    verdicts,
    rehearsal,
    rehearsalNote,
    notes,
    newlyFailing: verdicts.filter((v) => v.change === 'newly fails').length,
  };
}
