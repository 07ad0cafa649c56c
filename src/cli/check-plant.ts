/**
 * Evaluate every requirement of one loaded plant file: time-domain figures from its simulated
 * trial (the worst setpoint step), frequency-domain figures of the loop at every operating point
 * of the trial (the worst point, named: loop/'s requirement rows), and, when
 * `requirements.worst_case` is set, the worst of each over the uncertainty box (nominal plus every
 * corner; a seeded sample instead when there are too many uncertain quantities).
 *
 * The requirement table is analysis/requirements.ts; the verdicts live in loop/requirement-rows.ts
 * and loop/point-margins.ts (damping ratio of the dominant closed-loop poles included); this file
 * only runs the cases.
 */
import { effectiveMs } from '../analysis/index.js';
import {
  askedRequirements,
  CHECKED_REQUIREMENTS,
  describePoint,
  notPlainPidLoop,
  frequencyFigures as figuresFrom,
  requirementRow,
  timeFigures as trialTimeFigures,
  type Figure,
  type FrequencySource,
  type BuiltLoop,
  type RequirementRow,
} from '../loop/index.js';
import { compilePlant, plantUnits } from '../model/index.js';
import type { GainSet, PlantSpec } from '../model/types.js';
import {
  gainPointFigures,
  MAX_CORNER_DIMS,
  planSweep,
  resolveController,
  structureMargins,
  tuningContext,
  type TuningContext,
} from '../tune/index.js';
import { num } from './format.js';
import { simulatePlant, type SimulatedTrial } from './simulate-plant.js';

export { CHECKED_REQUIREMENTS, dominantDamping } from '../loop/index.js';
export type { Figure } from '../loop/index.js';

/** One row of the check table. */
export type CheckRow = RequirementRow;

/** The outcome for one plant file. */
export interface PlantCheck {
  rows: CheckRow[];
  /** True when every row passes (a file without requirements passes). */
  pass: boolean;
  /** The nominal simulated trial (for plots). */
  nominal: SimulatedTrial;
  /**
   * The nominal case's figures by requirement name: those the file asks for, and with
   * `allFigures` every frequency-domain one (for reports that show figures without limits).
   */
  figures: ReadonlyMap<string, Figure>;
  notes: string[];
}

/** Options of `checkPlant`. */
export interface CheckOptions {
  /** Also measure every frequency-domain figure, asked for or not (default false). */
  allFigures?: boolean;
  /** The file's loop when built already (`buildLoop(plant, ...)`, e.g. for the budget): its compiled plant is used. */
  loop?: BuiltLoop;
}

/** Where one case's frequency-domain figures come from, with the controller's starting gains. */
export function frequencySource(ctx: TuningContext, gains: GainSet, withDamping: boolean): FrequencySource {
  const spec = ctx.spec;
  if (notPlainPidLoop(spec.loop.controller) !== null) {
    // A Smith predictor or a cascade is not the plain PID loop: Ms, GM and PM come from tune's
    // structureMargins (loop broken at the actuator); bandwidth and damping are not computed.
    const c = spec.loop.controller;
    const name = c.named ?? c.structure;
    try {
      const m = structureMargins(ctx, resolveController(ctx, c).controller);
      if (m === null) return { kind: 'structure', figures: null, why: 'no linear model of the loop' };
      return { kind: 'structure', figures: { name, maxSensitivity: effectiveMs(m), gainMargin: m.gainMargin, phaseMarginDeg: m.phaseMarginDeg }, why: '' };
    } catch (error) {
      return { kind: 'structure', figures: null, why: (error as Error).message };
    }
  }
  const dyn = ctx.dynamics;
  return {
    kind: 'points',
    figures: gainPointFigures(ctx, gains, withDamping),
    describe: (i) => describePoint(ctx.points[i].point, dyn.disturbanceNames, dyn.d0, plantUnits(spec).output ?? ''),
  };
}

/** Check one loaded plant file. */
export function checkPlant(plant: PlantSpec, options: CheckOptions = {}): PlantCheck {
  const req = plant.loop.requirements;
  const asked = askedRequirements(req);
  const wantedFreq = new Set(
    (options.allFigures === true ? CHECKED_REQUIREMENTS : asked).filter((c) => c.domain === 'frequency').map((c) => c.name),
  );
  const notes: string[] = [];
  const dims = Object.keys(plant.uncertainty).length;
  const worst = req.worstCase === true;
  const gains = plant.loop.controller.gains;
  // The linear model and its frequency response are only prepared when something needs them.
  const needsContext = worst || wantedFreq.size > 0;
  const built = options.loop;
  const dynamics = built?.dynamics ?? compilePlant(plant);
  const base: TuningContext | null = needsContext ? tuningContext(plant, dynamics) : null;
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
    const sim =
      c.ctx === null || (c.ctx.spec === plant && c.ctx.dynamics === dynamics)
        ? simulatePlant(plant, dynamics, built)
        : simulatePlant(c.ctx.spec, c.ctx.dynamics);
    if (nominal === null) nominal = sim;
    const figures = trialTimeFigures(sim.result, sim.requirements, multipleSteps);
    if (c.ctx !== null && wantedFreq.size > 0) {
      for (const [k, v] of figuresFrom(frequencySource(c.ctx, gains, wantedFreq.has('damping_ratio')), wantedFreq)) figures.set(k, v);
    }
    perCase.push({ values: c.values, figures });
  }
  for (const w of nominal!.warnings) notes.push(w);

  const rows: CheckRow[] = [];
  const units = plantUnits(plant);
  for (const c of asked) {
    const limit = req[c.key] as number;
    const nom = perCase[0].figures.get(c.name) ?? { measured: NaN, available: false, note: 'not available' };
    rows.push(requirementRow(c, 'nominal', limit, nom, units));
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
      requirementRow(c, 'worst case', limit, {
        ...f,
        note: [`worst of ${perCase.length} cases${where ? ` at ${where}` : ' (nominal)'}`, f.note].filter((s) => s).join('; '),
      }, units),
    );
  }
  return { rows, pass: rows.every((r) => r.status === 'pass'), nominal: nominal!, figures: perCase[0].figures, notes };
}

