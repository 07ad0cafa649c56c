/**
 * Evaluate every requirement of one loaded plant file: time-domain figures from its simulated
 * trial, frequency-domain figures from the loop linearised at the trial's operating point, and,
 * when `requirements.worst_case` is set, the worst of each over the uncertainty box (nominal plus
 * every corner; a seeded sample instead when there are too many uncertain quantities).
 *
 * Frequency-domain definitions are those of analysis/margins.ts (GM, PM, Ms, bandwidth ω_B where
 * |S| first reaches 1/√2) on the loop C · ZOH · P · sensor, using the controller's starting gains.
 * Damping ratio of the dominant closed-loop poles (our definition, no source): the poles of the
 * closed loop (delay by Padé sections, analysis/closed-loop.ts) whose decay rate |Re p| is at
 * most twice that of the slowest pole count as dominant, and the smallest ζ = −Re p/|p| among
 * them is reported (a real pole has ζ = 1). A ratio of 2 keeps a slow real pole and an
 * oscillatory pair close to it together, and leaves out the higher branches of a dead-time loop
 * (for s + a e^(−θ s) = 0 with aθ = 0.5 the second branch decays 3.5 times faster than the first).
 */
import { closedLoopCheck, effectiveMs, loopExtras } from '../analysis/index.js';
import type { Margins, RequirementResult } from '../analysis/index.js';
import type { GainSet, PlantSpec, Requirements } from '../model/types.js';
import {
  gainMargins,
  MAX_CORNER_DIMS,
  planSweep,
  resolveController,
  structureMargins,
  tuningContext,
  type TuningContext,
} from '../tune/index.js';
import { num } from './format.js';
import { simulatePlant, type SimulatedTrial } from './simulate-plant.js';

/** measured <= limit ('max') or measured >= limit ('min'). */
export type LimitKind = 'max' | 'min';

/** Every requirement looprig checks: file key, kind, unit for printing, domain. */
export const CHECKED_REQUIREMENTS: readonly { name: string; key: keyof Requirements; kind: LimitKind; unit: string; domain: 'time' | 'frequency' }[] = [
  { name: 'overshoot_pct', key: 'overshootPct', kind: 'max', unit: '%', domain: 'time' },
  { name: 'rise_time', key: 'riseTime', kind: 'max', unit: 's', domain: 'time' },
  { name: 'settling_time', key: 'settlingTime', kind: 'max', unit: 's', domain: 'time' },
  { name: 'steady_state_error', key: 'steadyStateError', kind: 'max', unit: '', domain: 'time' },
  { name: 'iae', key: 'iae', kind: 'max', unit: '', domain: 'time' },
  { name: 'max_output', key: 'maxOutput', kind: 'max', unit: '', domain: 'time' },
  { name: 'saturated_time', key: 'saturatedTime', kind: 'max', unit: 's', domain: 'time' },
  { name: 'bandwidth', key: 'bandwidth', kind: 'min', unit: 'rad/s', domain: 'frequency' },
  { name: 'damping_ratio', key: 'dampingRatio', kind: 'min', unit: '', domain: 'frequency' },
  { name: 'max_sensitivity', key: 'maxSensitivity', kind: 'max', unit: '', domain: 'frequency' },
  { name: 'gain_margin', key: 'gainMargin', kind: 'min', unit: '', domain: 'frequency' },
  { name: 'phase_margin_deg', key: 'phaseMarginDeg', kind: 'min', unit: 'deg', domain: 'frequency' },
];

/** One measured figure of one case. NaN = not reached; `available: false` = could not be computed. */
interface Figure {
  measured: number;
  available: boolean;
  note: string;
}

/** One row of the check table. */
export interface CheckRow {
  requirement: string;
  scope: 'nominal' | 'worst case';
  measured: number;
  limit: number;
  kind: LimitKind;
  unit: string;
  status: 'pass' | 'fail' | 'not available';
  note: string;
}

/** The outcome for one plant file. */
export interface PlantCheck {
  rows: CheckRow[];
  /** True when every row passes (a file without requirements passes). */
  pass: boolean;
  /** The nominal simulated trial (for plots). */
  nominal: SimulatedTrial;
  notes: string[];
}

/** Dominance ratio of the damping definition (see the file comment). */
export const DOMINANCE_RATIO = 2;

/**
 * Smallest damping ratio among the dominant poles (see the file comment); an unstable or
 * marginal pole gives ζ <= 0. NaN for no poles.
 */
export function dominantDamping(poles: readonly { re: number; im: number }[]): { zeta: number; pole: { re: number; im: number } | null } {
  if (poles.length === 0) return { zeta: NaN, pole: null };
  let slowest = Infinity;
  for (const p of poles) slowest = Math.min(slowest, -p.re);
  let zeta = Infinity;
  let pole: { re: number; im: number } | null = null;
  for (const p of poles) {
    if (slowest > 0 && -p.re > DOMINANCE_RATIO * slowest) continue;
    const mag = Math.hypot(p.re, p.im);
    const z = mag === 0 ? 0 : -p.re / mag;
    if (z < zeta) {
      zeta = z;
      pole = p;
    }
  }
  return { zeta, pole };
}

const fmtPole = (p: { re: number; im: number }): string =>
  Math.abs(p.im) > 0 ? `${num(p.re, 3)} ± ${num(Math.abs(p.im), 3)}j` : num(p.re, 3);

/** Frequency-domain figures of one case with the controller's starting gains. */
function frequencyFigures(ctx: TuningContext, gains: GainSet, wanted: ReadonlySet<string>): Map<string, Figure> {
  const out = new Map<string, Figure>();
  if (wanted.size === 0) return out;
  if (ctx.linear === null || ctx.response === null) {
    const why = ctx.notes.find((n) => /lineari|linear model/i.test(n)) ?? 'no linear model of the loop at the operating point';
    for (const name of wanted) out.set(name, { measured: NaN, available: false, note: `not available: ${why}` });
    return out;
  }
  const spec = ctx.spec;
  const ext = spec.loop.controller.extension;
  if (ext !== undefined && (ext.kind === 'smith_pi' || ext.kind === 'cascade')) return structuredFigures(ctx, wanted);
  const m: Margins | null = gainMargins(ctx, gains);
  if (m === null) {
    for (const name of wanted) out.set(name, { measured: NaN, available: false, note: 'not available: no frequency response' });
    return out;
  }
  const unstable = m.closedLoopStable === false;
  const unstableNote = unstable ? 'closed loop unstable' : '';
  const at = (w: number): string => (Number.isFinite(w) ? `at ${num(w, 3)} rad/s` : '');
  out.set('max_sensitivity', {
    measured: effectiveMs(m),
    available: true,
    note: unstable ? unstableNote : at(m.maxSensitivityFrequency),
  });
  out.set('gain_margin', {
    measured: unstable ? NaN : m.gainMargin,
    available: true,
    note: unstable ? unstableNote : m.gainMargin === Infinity ? 'no phase crossover' : at(m.phaseCrossoverFrequency),
  });
  out.set('phase_margin_deg', {
    measured: unstable ? NaN : m.phaseMarginDeg,
    available: true,
    note: unstable ? unstableNote : m.phaseMarginDeg === Infinity ? '|L| never reaches 1' : at(m.crossoverFrequency),
  });
  out.set('bandwidth', {
    measured: unstable ? NaN : m.bandwidth,
    available: true,
    note: unstable ? unstableNote : Number.isFinite(m.bandwidth) ? '|S| reaches 1/√2' : '|S| never reaches 1/√2 below Nyquist',
  });
  if (wanted.has('damping_ratio')) {
    const rel = [m.crossoverFrequency, m.bandwidth, m.maxSensitivityFrequency].filter((w) => Number.isFinite(w));
    const cl = closedLoopCheck(ctx.linear, gains, loopExtras(spec.loop.sampleTime, spec.sensor), rel.length > 0 ? Math.max(...rel) : 0);
    const d = dominantDamping(cl.poles);
    out.set('damping_ratio', {
      measured: cl.wellPosed ? d.zeta : NaN,
      available: true,
      note: !cl.wellPosed ? 'the loop is not well posed' : d.pole ? `dominant pole ${fmtPole(d.pole)} rad/s` : 'no closed-loop poles',
    });
  }
  return out;
}

/**
 * A Smith predictor or a cascade is not the plain PID loop: Ms, GM and PM come from tune's
 * structureMargins (loop broken at the actuator, grid figures); bandwidth and the dominant
 * damping of such a loop are not computed (not available).
 */
function structuredFigures(ctx: TuningContext, wanted: ReadonlySet<string>): Map<string, Figure> {
  const out = new Map<string, Figure>();
  const c = ctx.spec.loop.controller;
  const name = c.named ?? c.structure;
  let m: ReturnType<typeof structureMargins> = null;
  let why = '';
  try {
    m = structureMargins(ctx, resolveController(ctx, c).controller);
    if (m === null) why = 'no linear model of the loop';
  } catch (error) {
    why = (error as Error).message;
  }
  for (const n of wanted) {
    if (m === null) out.set(n, { measured: NaN, available: false, note: `not available: ${why}` });
    else if (n === 'max_sensitivity') out.set(n, { measured: m.maxSensitivity, available: true, note: `${name}, loop broken at the actuator` });
    else if (n === 'gain_margin') out.set(n, { measured: m.gainMargin, available: true, note: `${name}, loop broken at the actuator` });
    else if (n === 'phase_margin_deg') out.set(n, { measured: m.phaseMarginDeg, available: true, note: `${name}, loop broken at the actuator` });
    else out.set(n, { measured: NaN, available: false, note: `not available for structure ${name} (not the plain PID loop)` });
  }
  return out;
}

/** Time-domain figures from one simulated trial. */
function timeFigures(sim: SimulatedTrial, multipleSteps: boolean): Map<string, Figure> {
  const out = new Map<string, Figure>();
  const diverged = sim.result.status === 'diverged';
  for (const r of sim.requirements as RequirementResult[]) {
    // A requirement the trial cannot show (a step figure without a setpoint step) is not available.
    if (r.status === 'n/a') {
      out.set(r.name, { measured: NaN, available: false, note: `not available: ${r.reason}` });
      continue;
    }
    let note = '';
    if (diverged) note = `trial diverged at t = ${num(sim.result.divergedAt ?? NaN)} s`;
    else if (!Number.isFinite(r.measured)) note = r.reason ?? '';
    else if (r.at !== null && multipleSteps) note = `worst step: at ${num(r.at)} s`;
    out.set(r.name, { measured: diverged ? NaN : r.measured, available: true, note });
  }
  return out;
}

function passes(measured: number, limit: number, kind: LimitKind): boolean {
  if (Number.isNaN(measured)) return false;
  return kind === 'max' ? measured <= limit : measured >= limit;
}

/** Check one loaded plant file. */
export function checkPlant(plant: PlantSpec): PlantCheck {
  const req = plant.loop.requirements;
  const asked = CHECKED_REQUIREMENTS.filter((c) => req[c.key] !== undefined);
  const wantedFreq = new Set(asked.filter((c) => c.domain === 'frequency').map((c) => c.name));
  const notes: string[] = [];
  const dims = Object.keys(plant.uncertainty).length;
  const worst = req.worstCase === true;
  const gains = plant.loop.controller.gains;
  // The linear model and its frequency response are only prepared when something needs them.
  const needsContext = worst || wantedFreq.size > 0;
  const base: TuningContext | null = needsContext ? tuningContext(plant) : null;
  if (wantedFreq.size > 0 && plant.loop.trial.events.some((e) => e.kind === 'gains')) {
    notes.push('frequency-domain figures use the controller\'s starting gains (the trial changes them later)');
  }

  // Cases: nominal first; with worst_case, every corner (or a seeded sample) of the uncertainty box.
  const plan: { cases: { values: Record<string, number>; ctx: TuningContext | null }[]; notes: string[] } =
    worst && base !== null
      ? planSweep(plant, { corners: true, samples: dims > MAX_CORNER_DIMS ? 16 : 0, nominal: true }, base)
      : { cases: [{ values: {}, ctx: base }], notes: [] };
  if (worst && dims === 0) notes.push('worst_case is set but the file has no uncertainty section: nominal only');
  notes.push(...plan.notes.filter((n) => !/no uncertainty section/.test(n)));

  const multipleSteps = (() => {
    let k = 0;
    for (const e of plant.loop.trial.events) if (e.kind === 'setpoint') k++;
    return k > 1;
  })();
  let nominal: SimulatedTrial | null = null;
  const perCase: { values: Record<string, number>; figures: Map<string, Figure> }[] = [];
  // A structure's model-derived values (a Smith model, a cascade's inner gains ...) are derived
  // once, from the nominal plant, and kept in every case: the controller does not learn the
  // perturbed plant.
  const c0 = plant.loop.controller;
  const resolved = worst && base !== null && c0.extension !== undefined ? resolveController(base, c0).controller : null;
  for (const c of plan.cases) {
    if (resolved !== null && c.ctx !== null) {
      const spec = { ...c.ctx.spec, loop: { ...c.ctx.spec.loop, controller: resolved } };
      c.ctx = { ...c.ctx, spec };
    }
    const sim = c.ctx === null ? simulatePlant(plant) : simulatePlant(c.ctx.spec, c.ctx.dynamics);
    if (nominal === null) nominal = sim;
    const figures = timeFigures(sim, multipleSteps);
    if (c.ctx !== null) for (const [k, v] of frequencyFigures(c.ctx, gains, wantedFreq)) figures.set(k, v);
    perCase.push({ values: c.values, figures });
  }
  for (const w of nominal!.warnings) notes.push(w);

  const rows: CheckRow[] = [];
  for (const c of asked) {
    const limit = req[c.key] as number;
    const nom = perCase[0].figures.get(c.name) ?? { measured: NaN, available: false, note: 'not available' };
    rows.push(row(c, 'nominal', limit, nom));
    if (!worst || perCase.length < 2) continue;
    // Worst: the largest measured value for a 'max' limit, the smallest for 'min'; a case that
    // could not be measured (NaN) is the worst of all.
    let pick = -1;
    for (let i = 0; i < perCase.length; i++) {
      const f = perCase[i].figures.get(c.name);
      if (!f) continue;
      if (pick < 0) {
        pick = i;
        continue;
      }
      const best = perCase[pick].figures.get(c.name)!;
      if (!f.available && best.available) pick = i;
      else if (f.available === best.available) {
        if (Number.isNaN(f.measured) && !Number.isNaN(best.measured)) pick = i;
        else if (!Number.isNaN(f.measured) && !Number.isNaN(best.measured)) {
          if (c.kind === 'max' ? f.measured > best.measured : f.measured < best.measured) pick = i;
        }
      }
    }
    const f = perCase[pick].figures.get(c.name)!;
    const where = Object.entries(perCase[pick].values)
      // The linear kinds' time_constant and delay are times (s); ode parameters carry no unit.
      .map(([k, v]) => `${k} = ${num(v)}${plant.model.type !== 'ode' && (k === 'delay' || k === 'time_constant') ? ' s' : ''}`)
      .join(', ');
    rows.push(
      row(c, 'worst case', limit, {
        ...f,
        note: [`worst of ${perCase.length} cases${where ? ` at ${where}` : ' (nominal)'}`, f.note].filter((s) => s).join('; '),
      }),
    );
  }
  return { rows, pass: rows.every((r) => r.status === 'pass'), nominal: nominal!, notes };
}

function row(c: (typeof CHECKED_REQUIREMENTS)[number], scope: CheckRow['scope'], limit: number, f: Figure): CheckRow {
  const status = !f.available ? 'not available' : passes(f.measured, limit, c.kind) ? 'pass' : 'fail';
  return { requirement: c.name, scope, measured: f.measured, limit, kind: c.kind, unit: c.unit, status, note: f.note };
}
