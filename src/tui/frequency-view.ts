/**
 * What the frequency view shows and what its shaping keys do, asked of the core: the edited gain
 * set's loop at its worst operating point (loop/'s worstPointResponse: the point of the largest
 * Ms, named as `check` names it), the gain set in service at the same point on the same grid, and
 * the PI or PID that tune's loop-shaping design puts through a crossover and phase-margin target
 * on that point's loop. Nothing here computes a figure of its own.
 */
import { loopMargins, type LoopFrequencyResponse, type Margins } from '../analysis/index.js';
import { notPlainPidLoop, pointResponseOf, worstPointResponse, type PreparedPoint } from '../loop/index.js';
import { responseDesignLoop, shapePi, shapePid, type ShapingTarget } from '../tune/index.js';
import { editWithGains, runningGains, type LoopSetup } from './engine.js';
import { movedTarget, type FrequencyCommand, type ShapeTarget } from './frequency-keys.js';
import { figure } from './frequency-plots.js';
import type { GainEdit } from './gain-edit.js';

/** The view's data for one edited gain set. */
export type FrequencyViewData =
  | {
      ok: true;
      /** The operating point, as check names it ('' for a linear plant's single point). */
      label: string;
      /** Index of the point in the prepared list (shaping designs on it). */
      index: number;
      edited: LoopFrequencyResponse;
      service: LoopFrequencyResponse | null;
    }
  | { ok: false; problem: string };

/** Why the view cannot show this edit's loop, or null when it can. */
export function viewProblem(setup: LoopSetup, edit: GainEdit): string | null {
  const kind = notPlainPidLoop(edit.frame?.spec ?? setup.controller);
  if (kind !== null) return `the frequency view draws the plain PID loop; this loop is ${kind} (its margins are on the main screen)`;
  return null;
}

/**
 * The loop of `edit` at its worst point, with `service` (the set in service; null = not drawn) at
 * the same point on the same grid of `points` frequencies.
 */
export function frequencyViewData(
  setup: LoopSetup,
  prepared: readonly PreparedPoint[],
  edit: GainEdit,
  service: GainEdit | null,
  points: number,
): FrequencyViewData {
  const problem = viewProblem(setup, edit);
  if (problem !== null) return { ok: false, problem };
  const spec = setup.plant;
  const worst = worstPointResponse(prepared, runningGains(edit), spec, setup.dynamics, { points });
  if (worst === null) {
    const why = prepared.find((p) => p.point.problem !== null)?.point.problem ?? 'no linear model of the loop at its operating points';
    return { ok: false, problem: `no frequency response: ${why}` };
  }
  const w = worst.response.w;
  const other =
    service === null || viewProblem(setup, service) !== null
      ? null
      : pointResponseOf(prepared[worst.index], runningGains(service), spec, {
          wMin: w[0],
          wMax: w[w.length - 1],
          points: w.length,
          margins: serviceMargins(setup, prepared[worst.index], service),
        });
  return { ok: true, label: worst.label, index: worst.index, edited: worst.response, service: other };
}

/**
 * The set in service does not change while its gains are edited: its margins at a point are
 * worked out once (loopMargins) and kept with the edit object and the point, so a key press only
 * evaluates its curve on the new grid.
 */
const marginsKept = new WeakMap<GainEdit, WeakMap<PreparedPoint, Margins>>();

function serviceMargins(setup: LoopSetup, point: PreparedPoint, service: GainEdit): Margins | undefined {
  if (point.response === null) return undefined;
  let byPoint = marginsKept.get(service);
  if (byPoint === undefined) {
    byPoint = new WeakMap();
    marginsKept.set(service, byPoint);
  }
  let m = byPoint.get(point);
  if (m === undefined) {
    m = loopMargins(point.response, runningGains(service), setup.plant.loop.sampleTime, setup.plant.sensor);
    byPoint.set(point, m);
  }
  return m;
}

/** The target to move from: the last one, or the loop's own crossover and phase margin. */
export function startTarget(last: ShapeTarget | null, data: FrequencyViewData): ShapeTarget | null {
  if (last !== null) return last;
  if (!data.ok) return null;
  const m = data.edited.margins;
  const wc = Number.isFinite(m.crossoverFrequency) ? m.crossoverFrequency : m.maxSensitivityFrequency;
  if (!(wc > 0) || !Number.isFinite(wc)) return null;
  const pm = Number.isFinite(m.phaseMarginDeg) && m.phaseMarginDeg > 0 ? m.phaseMarginDeg : 45;
  return { crossover: wc, phaseMarginDeg: pm };
}

/** Default Ti/Td of a shaped PID when the edit has no derivative to take it from (loop-shaping.ts' default). */
const TI_TD_RATIO = 4;

/**
 * The edit with the PI or PID gains that put the loop at `target` (tune's shapePi / shapePid on the
 * point the view shows), in the edit's form and frame; or why not. A PID keeps the edit's Ti/Td;
 * the controller's action (the sign of Kc) is kept.
 */
export function shapedEdit(setup: LoopSetup, prepared: readonly PreparedPoint[], index: number, edit: GainEdit, target: ShapeTarget): GainEdit | { error: string } {
  const structure = edit.structure;
  if (structure !== 'pi' && structure !== 'pid') return { error: `loop shaping designs a PI or a PID; this gain set is a ${structure.toUpperCase()}` };
  const response = prepared[index]?.response ?? null;
  if (response === null) return { error: 'no linear model of the loop at this point' };
  const g = runningGains(edit);
  const ratio = structure === 'pid' && g.td > 0 && Number.isFinite(g.ti) ? g.ti / g.td : TI_TD_RATIO;
  const t: ShapingTarget = { crossover: target.crossover, phaseMarginDeg: target.phaseMarginDeg, tiTdRatio: ratio };
  const loop = responseDesignLoop(response, setup.plant.loop.sampleTime, setup.plant.sensor, g);
  const sign = g.kc < 0 ? -1 : 1;
  const r = structure === 'pi' ? shapePi(loop, t, sign) : shapePid(loop, t, sign);
  if ('reason' in r) return { error: r.reason };
  // Four significant digits: what a person reads and types; the crossover moves by < 0.01 %.
  const round = (v: number): number => (Number.isFinite(v) ? Number(v.toPrecision(4)) : v);
  return editWithGains({ ...edit.gains, kc: round(r.kc), ti: round(r.ti), td: round(r.td) }, structure, edit.form, edit.frame);
}

/** The outcome of one shaping key: the new target and the edit designed for it (null: none, `text` says why). */
export interface ShapeOutcome {
  target: ShapeTarget;
  edit: GainEdit | null;
  text: string;
}

/**
 * One shaping key: the target moved from `from` (null: the loop's own ωc and PM as the view shows
 * them) and the gains designed for it; null when the view has no loop to start from.
 */
export function shapeStep(
  setup: LoopSetup,
  prepared: readonly PreparedPoint[],
  data: FrequencyViewData,
  edit: GainEdit,
  command: FrequencyCommand,
  from: ShapeTarget | null,
): ShapeOutcome | null {
  const start = startTarget(from, data);
  if (start === null || !data.ok) return null;
  // The target as it is shown (3 significant digits, 0.1°): what the design is asked for and says.
  const moved = movedTarget(start, command);
  const target = { crossover: Number(moved.crossover.toPrecision(3)), phaseMarginDeg: Math.round(moved.phaseMarginDeg * 10) / 10 };
  const r = shapedEdit(setup, prepared, data.index, edit, target);
  const aim = `ωc ${figure(target.crossover)} rad/s, PM ${figure(target.phaseMarginDeg)}°`;
  if ('error' in r) return { target, edit: null, text: r.error };
  return { target, edit: r, text: `shaped for ${aim}: ${edit.structure.toUpperCase()} gains applied (u undoes)` };
}
