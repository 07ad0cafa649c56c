/**
 * The gain-edit model: one gain set as the screen edits it, and the controller structure around
 * it. Plain data the reducer and the tuning aids' views (tuning-views.ts) both hold, kept in a file
 * of its own so neither of those imports the other.
 *
 * One representation is stored: the form values the user sees, edits and the file gets
 * (`values`), with the law settings that have no form (N, b, c, anti-windup, tracking time). The
 * ideal gains the controller runs (`gains`) are derived from them, in one place (`makeEdit`), so
 * the two can never disagree. Deriving the other way would not do: a series set has two writings
 * of the same controller (Ti' and Td' swapped, another Kc'), and the user's own must stay on screen.
 */
import { defaultTrackingTime } from '../control/index.js';
import { fromIdeal, toIdeal } from '../model/index.js';
import type { ControllerSpec, ControllerStructure, GainSet, PidForm, StructureName } from '../model/types.js';
import { formParams, type ParamId } from './param-meta.js';

/**
 * What surrounds the edited PID law: the file's own controller structure, or a comparison
 * candidate's. The reducer reads the flags; `spec` is for the engine (engine.ts `frameOf`).
 */
export interface ControllerFrame {
  /** 'file' for the file's own controller; 'candidate:<name>' for a comparison candidate. */
  readonly id: string;
  /** Structure name (pi, i_pd, smith_pi, cascade ...). */
  readonly named: StructureName;
  /** The comparison candidate's name (null: the file's controller). */
  readonly candidate: string | null;
  /** False when the law's gains are not the ones that run (a gain schedule: its table holds them). */
  readonly editable: boolean;
  /** b and c are fixed by the structure's name (pi_d: 1, 0; i_pd: 0, 0): not offered for editing. */
  readonly fixedWeights: boolean;
  /** A structure around the law (Smith predictor, feedforward, cascade, schedule). */
  readonly extended: boolean;
  /** The resolved controller the engine builds around the edited gains. */
  readonly spec: ControllerSpec;
}

/** The law settings that no PID form writes: they live in `gains` only. */
export type LawSettings = Omit<GainSet, 'kc' | 'ti' | 'td'>;

/** One gain set as edited: the form the user sees, its values, and (derived) the same set in ideal form. */
export interface GainEdit {
  readonly structure: ControllerStructure;
  readonly form: PidForm;
  /** Form parameters as shown (times in s, ki in 1/s): the stored representation. */
  readonly values: Readonly<Record<string, number>>;
  /** Ideal form, what the controller runs: `values` converted by `makeEdit`, with the law settings. */
  readonly gains: GainSet;
  /** The structure around the law; absent = the file's own controller. */
  readonly frame?: ControllerFrame;
}

/**
 * A gain set from its form values: the one place the ideal gains are derived. Terms the structure
 * lacks are neutral (no integral: Ti = ∞; no derivative: Td = 0). Throws RangeError when the form
 * cannot mean the values (parallel gains of mixed signs, overflow).
 */
export function makeEdit(
  structure: ControllerStructure,
  form: PidForm,
  values: Readonly<Record<string, number>>,
  law: LawSettings,
  frame?: ControllerFrame,
): GainEdit {
  const full: Record<string, number> =
    form === 'parallel' ? { kp: 0, ki: 0, kd: 0, ...values } : { kc: 0, ti: Infinity, td: 0, ...values };
  const ideal = toIdeal(form, full);
  const { n, b, c, antiWindup, trackingTime } = law;
  const edit: GainEdit = { structure, form, values, gains: { kc: ideal.kc, ti: ideal.ti, td: ideal.td, n, b, c, antiWindup, trackingTime } };
  return frame === undefined ? edit : { ...edit, frame };
}

/**
 * Ideal gains written in `form` for `structure` (only the form's parameters the structure has),
 * or null when the form cannot hold them (series needs Ti >= 4 Td).
 */
export function valuesInForm(structure: ControllerStructure, form: PidForm, g: Pick<GainSet, 'kc' | 'ti' | 'td'>): Record<string, number> | null {
  const all = fromIdeal(form, { kc: g.kc, ti: g.ti, td: g.td });
  if (all === null) return null;
  const values: Record<string, number> = {};
  for (const k of formParams(structure, form)) values[k] = all[k];
  return values;
}

/** Structures a save may switch the file's controller between (it gains or loses its derivative term). */
const SWITCHABLE: ReadonlySet<ControllerStructure> = new Set<ControllerStructure>(['pi', 'pid']);

/** True when a file whose controller is `from` can be rewritten as `to` (asked first on the screen). */
export function structureSwitchable(from: ControllerStructure, to: ControllerStructure): boolean {
  return SWITCHABLE.has(from) && SWITCHABLE.has(to);
}

/** The frame id of an edit ('file' when it has none). */
export function frameId(e: GainEdit): string {
  return e.frame?.id ?? 'file';
}

/**
 * The structure name an edit runs, for display: its frame's (i_pd, smith_pi ...), except that a
 * plain law of another structure in the file's frame (a rule's PID over a PI file) is named as
 * what it is.
 */
export function namedOf(e: GainEdit): StructureName {
  const named = e.frame?.named;
  if (named === undefined || (named === 'p' || named === 'pi' || named === 'pd' || named === 'pid')) return e.structure;
  return named;
}

/**
 * Every editable parameter of a gain set, in display order: b and c only where the structure
 * leaves them free, the tracking time only with back-calculation on an integral term.
 */
export function paramList(e: GainEdit): ParamId[] {
  const hasD = e.structure === 'pd' || e.structure === 'pid';
  const hasI = e.structure === 'pi' || e.structure === 'pid';
  const list = formParams(e.structure, e.form);
  if (hasD) list.push('n');
  if (hasI && e.gains.antiWindup === 'back_calculation') list.push('tt');
  if (e.frame?.fixedWeights === true) return list;
  list.push('b');
  if (hasD) list.push('c');
  return list;
}

/** The value of a parameter in a gain set (the tracking time: NaN when left to its default). */
export function paramValue(e: GainEdit, id: ParamId): number {
  if (id === 'n' || id === 'b' || id === 'c') return e.gains[id];
  if (id === 'tt') return e.gains.trackingTime;
  return e.values[id];
}

/** The value a parameter acts with: the tracking time left to its default is control's default (√(Ti Td), or Ti/2). */
export function effectiveValue(e: GainEdit, id: ParamId): number {
  return id === 'tt' ? defaultTrackingTime(e.gains) : paramValue(e, id);
}

/**
 * A new gain set with one parameter changed, or the reason the form refused it (e.g. parallel
 * gains of mixed signs).
 */
export function withParam(e: GainEdit, id: ParamId, v: number): GainEdit | { error: string } {
  if (id === 'n' || id === 'b' || id === 'c') return { ...e, gains: { ...e.gains, [id]: v } };
  if (id === 'tt') return { ...e, gains: { ...e.gains, trackingTime: v } };
  try {
    return makeEdit(e.structure, e.form, { ...e.values, [id]: v }, e.gains, e.frame);
  } catch (err) {
    if (err instanceof RangeError) return { error: err.message };
    throw err;
  }
}

/** The same controller written in another form, or null when that form cannot hold it. */
export function withForm(e: GainEdit, form: PidForm): GainEdit | null {
  const values = valuesInForm(e.structure, form, e.gains);
  return values === null ? null : makeEdit(e.structure, form, values, e.gains, e.frame);
}

/**
 * True when two gain sets are the same controller: same structure and, in ideal form, the same
 * gains (to 1e-9 relative, so that a form round trip's rounding is no change). The form they are
 * shown in does not count: a save writes the file's own form.
 */
export function sameEdit(a: GainEdit, b: GainEdit): boolean {
  if (a.structure !== b.structure || frameId(a) !== frameId(b)) return false;
  const g = a.gains;
  const h = b.gains;
  return (
    close(g.kc, h.kc) &&
    close(g.ti, h.ti) &&
    close(g.td, h.td) &&
    g.n === h.n &&
    g.b === h.b &&
    g.c === h.c &&
    g.antiWindup === h.antiWindup &&
    Object.is(g.trackingTime, h.trackingTime)
  );
}

function close(x: number, y: number): boolean {
  return x === y || Math.abs(x - y) <= 1e-9 * Math.max(Math.abs(x), Math.abs(y));
}
