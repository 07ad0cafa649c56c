/**
 * The tuning rules offered, each with what it needs from the low-order description of the plant.
 * Every formula is in rules/<rule>.ts with its source; this table only picks the inputs.
 */
import type { Fopdt, IntegratingDelay, RuleGains, Sopdt, UltimatePoint } from './low-order.js';
import { amigoIntegratingPi, amigoIntegratingPid, amigoPi, amigoPid } from './rules/amigo.js';
import { cohenCoonP, cohenCoonPi, cohenCoonPid } from './rules/cohen-coon.js';
import { imcPi, imcPid } from './rules/imc.js';
import { lambdaPi } from './rules/lambda.js';
import { simcImprovedPid, simcIntegratingPi, simcPi, simcPid } from './rules/simc.js';
import { znStepP, znStepPi, znStepPid } from './rules/ziegler-nichols-step.js';
import { znUltimateP, znUltimatePi, znUltimatePid } from './rules/ziegler-nichols-ultimate.js';

/** Low-order descriptions of one plant (null where not available or not meaningful). */
export interface RuleInputs {
  /** Self-regulating FOPDT approximation. */
  fopdt: Fopdt | null;
  /** SOPDT approximation. */
  sopdt: Sopdt | null;
  /** Integrating plus delay approximation (integrating plants only). */
  integrating: IntegratingDelay | null;
  /** Ultimate point of the loop. */
  ultimate: UltimatePoint | null;
}

/** The rules' free parameters. null = each rule's default. */
export interface RuleParameters {
  /** Lambda / IMC closed-loop time constant, s. Defaults: lambda PI tau1; IMC PI 1.7 theta; IMC PID 0.8 theta. */
  lambda: number | null;
  /** SIMC closed-loop time constant tauc, s (default theta). */
  tauc: number | null;
}

/** One tuning rule. */
export interface TuningRule {
  /** Stable identifier (kebab-case), used in --json and on the screen. */
  id: string;
  /** Display name. */
  label: string;
  structure: 'p' | 'pi' | 'pid';
  /** Short citation. */
  source: string;
  /**
   * The rule starts from the ultimate point, which on a real loop is measured by driving it into a
   * sustained oscillation (relay test or ultimate-cycle experiment): shown with the caution.
   */
  usesUltimate: boolean;
  /** The rule's gains, or a sentence saying why it does not apply to this plant. */
  apply(inputs: RuleInputs, params: RuleParameters): RuleGains | string;
}

const NEEDS_FOPDT = 'needs a self-regulating plant (first order plus delay approximation)';
const NEEDS_DELAY = 'needs a non-zero effective delay';
const NEEDS_ULTIMATE = 'needs an ultimate gain (the loop phase never reaches -180 deg)';

/** A FOPDT description with a delay > 0 (rules dividing by theta), or the reason there is none. */
function fopdtWithDelay(i: RuleInputs): Fopdt | string {
  if (i.fopdt === null) return NEEDS_FOPDT;
  return i.fopdt.theta > 0 ? i.fopdt : NEEDS_DELAY;
}

/**
 * The reaction-curve intercept a = R L works for integrating plants too (R = kv, the constant
 * slope): pass it as a FOPDT with tau1 = 1 s and k = kv, so that a = k theta/tau1 = kv theta.
 */
function reactionCurve(i: RuleInputs): Fopdt | string {
  if (i.fopdt !== null) return fopdtWithDelay(i);
  if (i.integrating !== null && i.integrating.theta > 0) return { k: i.integrating.kv, tau1: 1, theta: i.integrating.theta };
  return i.integrating !== null ? NEEDS_DELAY : NEEDS_FOPDT;
}

function withFopdt(f: (m: Fopdt) => RuleGains): TuningRule['apply'] {
  return (i) => {
    const m = fopdtWithDelay(i);
    return typeof m === 'string' ? m : f(m);
  };
}

function withUltimate(f: (u: UltimatePoint) => RuleGains): TuningRule['apply'] {
  return (i) => (i.ultimate === null ? NEEDS_ULTIMATE : f(i.ultimate));
}

function znStep(f: (m: Fopdt) => RuleGains): TuningRule['apply'] {
  return (i) => {
    const m = reactionCurve(i);
    return typeof m === 'string' ? m : f(m);
  };
}

const ZN = 'Ziegler & Nichols, Trans. ASME 64 (1942)';
const CC = 'Cohen & Coon, Trans. ASME 75 (1953)';
const RMS = 'Rivera, Morari & Skogestad, IECPDD 25 (1986)';
const SIMC = 'Skogestad, J. Process Control 13 (2003)';
const ISIMC = 'Grimholt & Skogestad, J. Process Control 70 (2018)';
const AMIGO = 'Åström & Hägglund, J. Process Control 14 (2004)';

/** All rules, in display order. */
export const TUNING_RULES: readonly TuningRule[] = [
  { id: 'zn-step-p', label: 'ZN step P', structure: 'p', source: ZN, usesUltimate: false, apply: znStep(znStepP) },
  { id: 'zn-step-pi', label: 'ZN step PI', structure: 'pi', source: ZN, usesUltimate: false, apply: znStep(znStepPi) },
  { id: 'zn-step-pid', label: 'ZN step PID', structure: 'pid', source: ZN, usesUltimate: false, apply: znStep(znStepPid) },
  { id: 'zn-ultimate-p', label: 'ZN ultimate P', structure: 'p', source: ZN, usesUltimate: true, apply: withUltimate(znUltimateP) },
  { id: 'zn-ultimate-pi', label: 'ZN ultimate PI', structure: 'pi', source: ZN, usesUltimate: true, apply: withUltimate(znUltimatePi) },
  { id: 'zn-ultimate-pid', label: 'ZN ultimate PID', structure: 'pid', source: ZN, usesUltimate: true, apply: withUltimate(znUltimatePid) },
  { id: 'cohen-coon-p', label: 'Cohen-Coon P', structure: 'p', source: CC, usesUltimate: false, apply: withFopdt(cohenCoonP) },
  { id: 'cohen-coon-pi', label: 'Cohen-Coon PI', structure: 'pi', source: CC, usesUltimate: false, apply: withFopdt(cohenCoonPi) },
  { id: 'cohen-coon-pid', label: 'Cohen-Coon PID', structure: 'pid', source: CC, usesUltimate: false, apply: withFopdt(cohenCoonPid) },
  {
    id: 'lambda-pi',
    label: 'Lambda PI',
    structure: 'pi',
    source: 'IMC/lambda (Dahlin 1968)',
    usesUltimate: false,
    apply: (i, p) => (i.fopdt === null ? NEEDS_FOPDT : lambdaPi(i.fopdt, p.lambda ?? i.fopdt.tau1)),
  },
  {
    id: 'imc-pi',
    label: 'IMC PI',
    structure: 'pi',
    source: RMS,
    usesUltimate: false,
    apply: (i, p) => {
      const m = p.lambda === null ? fopdtWithDelay(i) : i.fopdt ?? NEEDS_FOPDT;
      return typeof m === 'string' ? m : imcPi(m, p.lambda ?? 1.7 * m.theta);
    },
  },
  {
    id: 'imc-pid',
    label: 'IMC PID',
    structure: 'pid',
    source: RMS,
    usesUltimate: false,
    apply: (i, p) => {
      const m = p.lambda === null ? fopdtWithDelay(i) : i.fopdt ?? NEEDS_FOPDT;
      return typeof m === 'string' ? m : imcPid(m, p.lambda ?? 0.8 * m.theta);
    },
  },
  {
    id: 'simc-pi',
    label: 'SIMC PI',
    structure: 'pi',
    source: SIMC,
    usesUltimate: false,
    apply: (i, p) => {
      if (i.integrating !== null) {
        return i.integrating.theta > 0 || p.tauc !== null ? simcIntegratingPi(i.integrating, p.tauc ?? i.integrating.theta) : NEEDS_DELAY;
      }
      if (i.fopdt === null) return NEEDS_FOPDT;
      return i.fopdt.theta > 0 || p.tauc !== null ? simcPi(i.fopdt, p.tauc ?? i.fopdt.theta) : NEEDS_DELAY;
    },
  },
  {
    id: 'simc-pid',
    label: 'SIMC PID',
    structure: 'pid',
    source: SIMC,
    usesUltimate: false,
    apply: (i, p) => {
      if (i.sopdt === null) return 'needs a self-regulating plant with a second lag (second order plus delay approximation)';
      return i.sopdt.theta > 0 || p.tauc !== null ? simcPid(i.sopdt, p.tauc ?? i.sopdt.theta) : NEEDS_DELAY;
    },
  },
  {
    id: 'simc-improved-pid',
    label: 'Improved SIMC PID',
    structure: 'pid',
    source: ISIMC,
    usesUltimate: false,
    apply: (i, p) => {
      const m = fopdtWithDelay(i);
      return typeof m === 'string' ? m : simcImprovedPid(m, p.tauc ?? m.theta);
    },
  },
  {
    id: 'amigo-pi',
    label: 'AMIGO PI',
    structure: 'pi',
    source: AMIGO,
    usesUltimate: false,
    apply: (i) => {
      if (i.integrating !== null) return i.integrating.theta > 0 ? amigoIntegratingPi(i.integrating) : NEEDS_DELAY;
      const m = fopdtWithDelay(i);
      return typeof m === 'string' ? m : amigoPi(m);
    },
  },
  {
    id: 'amigo-pid',
    label: 'AMIGO PID',
    structure: 'pid',
    source: AMIGO,
    usesUltimate: false,
    apply: (i) => {
      if (i.integrating !== null) return i.integrating.theta > 0 ? amigoIntegratingPid(i.integrating) : NEEDS_DELAY;
      const m = fopdtWithDelay(i);
      return typeof m === 'string' ? m : amigoPid(m);
    },
  },
];
