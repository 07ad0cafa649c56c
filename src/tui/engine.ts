/**
 * The screen's window on the core: set a loop up from a plant file, run a trial with a gain
 * set, measure it. Every number drawn comes from here; nothing here is physics of its own.
 *
 * A controller with a richer structure (Smith predictor, feedforward, cascade, gain schedule,
 * the named 2-DOF laws) runs as `looprig run` runs it: tune's `resolveController` fills the
 * values the file leaves to the model (once, when the file is opened), and the edited gain set
 * is the PID law inside that structure.
 */
import { checkRequirements, trialMetrics, type RequirementResult, type TrialMetrics } from '../analysis/index.js';
import { applyStructure } from '../control/index.js';
import { notPlainPidLoop, type BuiltLoop } from '../loop/index.js';
import { MATH_HELPERS, fromIdeal } from '../model/index.js';
import type { ControllerSpec, ControllerStructure, GainSet, PidForm, PlantSpec, StructureName, TrialSpec } from '../model/types.js';
import { runTrial } from '../sim/index.js';
import type { DiscreteController, LoopConfig, PlantDynamics, TrialResult } from '../sim/types.js';
import {
  fileLoop,
  rehearsalTrial as coreRehearsalTrial,
  screenTrial,
  structureMargins,
  tuningContext,
  type TuningContext,
} from '../tune/index.js';
import type { MarginsView } from './notices.js';
import { makeEdit, valuesInForm, type ControllerFrame, type GainEdit } from './gain-edit.js';
import { formParams } from './param-meta.js';

/** A compiled loop, made once per file. */
export interface LoopSetup {
  readonly plant: PlantSpec;
  readonly dynamics: PlantDynamics;
  readonly config: LoopConfig;
  /** The file's controller with every model-derived value filled in (what the engine builds). */
  readonly controller: ControllerSpec;
  /** How the structure's model-derived values were obtained (empty for a plain law). */
  readonly basis: readonly string[];
  /** The loop as loop/'s buildLoop made it (start point, notes); every run here uses it. */
  readonly loop: BuiltLoop;
  /** The tune layer's preparation of the file (linear model, frequency response), made on first use. */
  context(): TuningContext;
}

/** One evaluated trial. */
export interface Evaluation {
  readonly result: TrialResult;
  readonly metrics: TrialMetrics;
  readonly checks: RequirementResult[];
  /** Wall time the simulation and metrics took, ms. */
  readonly elapsedMs: number;
}

/**
 * Compile the plant, fix the integration step and resolve the controller's structure. Throws the
 * tune layer's `StructureUnavailable` when the file's structure cannot be set up for this plant
 * (e.g. a Smith predictor on an integrating plant), as `looprig run` refuses it.
 */
export function setupLoop(plant: PlantSpec): LoopSetup {
  // The loop as `looprig run` builds it (loop/'s buildLoop through tune's fileLoop).
  const file = fileLoop(plant);
  const { dynamics, config } = file.loop;
  let ctx: TuningContext | null = file.context;
  const context = (): TuningContext => (ctx ??= tuningContext(plant, dynamics));
  // A resolved structure is in the ideal form; the screen keeps editing in the file's form.
  return { plant, dynamics, config, controller: file.loop.controllerSpec, basis: file.basis, loop: file.loop, context };
}

/** The structure name a controller spec runs (pi_d, smith_pi ... or the plain law). */
export function structureName(spec: ControllerSpec): StructureName {
  return spec.named ?? spec.structure;
}

/** The frame of a controller spec: what around the PID law is fixed, and whether the law is editable. */
export function frameOf(spec: ControllerSpec, id: string, candidate: string | null): ControllerFrame {
  const named = structureName(spec);
  return {
    id,
    named,
    candidate,
    // A schedule's table holds the gains that run; the spec's own gains are only its start.
    editable: spec.extension?.kind !== 'scheduled',
    fixedWeights: named === 'pi_d' || named === 'i_pd',
    extended: spec.extension !== undefined,
    spec,
  };
}

/** The frame of the file's own controller. */
export function fileFrame(setup: LoopSetup): ControllerFrame {
  return frameOf(setup.controller, 'file', null);
}

/** The file's controller as an editable gain set, in the file's form (with its frame when given). */
export function editFromSpec(spec: ControllerSpec, frame?: ControllerFrame): GainEdit {
  const gains = applyStructure(spec.structure, spec.gains);
  const converted = fromIdeal(spec.form, { kc: gains.kc, ti: gains.ti, td: gains.td });
  const values: Record<string, number> = {};
  for (const k of formParams(spec.structure, spec.form)) {
    const v = spec.values[k];
    values[k] = typeof v === 'number' && !Number.isNaN(v) ? v : (converted?.[k] ?? NaN);
  }
  // A value the file leaves to the model that its own form cannot hold (series needs Ti >= 4 Td): shown in ideal form.
  if (Object.values(values).some(Number.isNaN)) return makeEdit(spec.structure, 'ideal', valuesInForm(spec.structure, 'ideal', gains)!, gains, frame);
  return makeEdit(spec.structure, spec.form, values, gains, frame);
}

/** The file's controller as the screen edits it first. */
export function fileEdit(setup: LoopSetup): GainEdit {
  return editFromSpec(setup.plant.loop.controller, fileFrame(setup));
}

/**
 * A gain set (ideal form) as an edit in `form` inside `frame`: the values re-expressed in that
 * form, or in the ideal form when that form cannot hold them (series needs Ti >= 4 Td).
 */
export function editWithGains(gains: GainSet, structure: ControllerStructure, form: PidForm, frame: ControllerFrame | undefined): GainEdit {
  const g = applyStructure(structure, gains);
  const inForm = valuesInForm(structure, form, g);
  if (inForm !== null) return makeEdit(structure, form, inForm, g, frame);
  return makeEdit(structure, 'ideal', valuesInForm(structure, 'ideal', g)!, g, frame);
}

/** The controller spec an edit runs: its frame's (a compare candidate's) or the file's, with the edited law. */
export function specFor(setup: LoopSetup, edit: GainEdit): ControllerSpec {
  const spec = edit.frame?.spec ?? setup.controller;
  return { ...spec, structure: edit.structure, gains: edit.gains };
}

/** A controller of the edit's structure (the file's, or a compare candidate's) with these gains. */
export function controllerFor(setup: LoopSetup, edit: GainEdit): DiscreteController {
  return setup.loop.controller(specFor(setup, edit));
}

/**
 * Margins of a structure whose loop is not the plain PID loop (Smith predictor, cascade: broken
 * at the actuator, from tune's `structureMargins`); undefined when the PID loop's own margins
 * apply (plain laws, 2-DOF weights, feedforward, a schedule at its start), which the notice
 * source computes.
 */
export function structureMarginsView(setup: LoopSetup, edit: GainEdit): MarginsView | null | undefined {
  if (notPlainPidLoop(edit.frame?.spec ?? setup.controller) === null) return undefined;
  const m = structureMargins(setup.context(), specFor(setup, edit));
  if (m === null) return null;
  return { gainMargin: m.gainMargin, phaseMarginDeg: m.phaseMarginDeg, maxSensitivity: m.maxSensitivity, closedLoopStable: m.closedLoopStable };
}

/**
 * The plant file as the tune layer should see it for this edit: the file with the edited gain
 * set as its controller (plain law), so that rules keep the edit's filter, weights and
 * anti-windup, and every figure they report is for the gain set they would leave behind.
 */
export function plantFor(setup: LoopSetup, edit: GainEdit): PlantSpec {
  const { extension: _e, named: _n, ...plain } = setup.plant.loop.controller;
  const controller: ControllerSpec = { ...plain, structure: edit.structure, gains: edit.gains };
  return { ...setup.plant, loop: { ...setup.plant.loop, controller } };
}

/** The tune layer's context of the file, seen with the edit as its controller (shares the linear model). */
export function contextFor(setup: LoopSetup, edit: GainEdit): TuningContext {
  return { ...setup.context(), spec: plantFor(setup, edit) };
}

/** The gains the controller law runs for a gain set (structure imposed). */
export function runningGains(edit: GainEdit): GainSet {
  return applyStructure(edit.structure, edit.gains);
}

/** The file's trial with a switch to `next` gains at `at` (rehearsing a retune; tune's rehearsal trial). */
export function rehearsalTrial(trial: TrialSpec, next: GainEdit, at: number): TrialSpec {
  return coreRehearsalTrial(trial, runningGains(next), at);
}

/** Labels and instants of the file's own gain switches (the screen tells the user it skips them). */
export function fileGainSwitches(trial: TrialSpec): { at: number; label: string }[] {
  const out: { at: number; label: string }[] = [];
  for (const e of trial.events) if (e.kind === 'gains') out.push({ at: e.at, label: e.label });
  return out;
}

/** Run a trial with a gain set and measure it against the file's requirements. */
export function evaluate(setup: LoopSetup, edit: GainEdit, trial: TrialSpec = screenTrial(setup.plant.loop.trial)): Evaluation {
  const t0 = performance.now();
  const result = runTrial(setup.dynamics, controllerFor(setup, edit), setup.config, trial, { helpers: MATH_HELPERS });
  const req = setup.plant.loop.requirements;
  const metrics = trialMetrics(result.trace, trial, req);
  const checks = checkRequirements(metrics, req);
  return { result, metrics, checks, elapsedMs: performance.now() - t0 };
}
