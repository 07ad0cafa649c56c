/**
 * The pole-placement rows of `suggest`: PI (first-order or integrating model) and PID
 * (second-order model) placing a chosen closed-loop pole target, as rules of the same shape as
 * the published tuning rules so that they are simulated and judged like every other row.
 */
import type { RuleInputs, TuningRule } from './rule-table.js';
import type { RuleGains } from './low-order.js';
import { dominantPolePi, poleplacementIntegratingPi, poleplacementPi, poleplacementPid, type Placement, type PoleTarget } from './rules/pole-placement.js';

const SOURCE = 'Åström & Hägglund, Advanced PID Control (2006), sec. 6.2';

/**
 * Largest target pole magnitude times the sample time for which a continuous design still holds
 * on the sampled loop: ω h of about 0.1 to 0.6 is the usual choice of sample time for a loop of
 * bandwidth ω (Åström & Wittenmark, Computer-Controlled Systems, 3rd ed. 1997, ch. 7 on the
 * choice of sampling interval, from memory). Above it the hold's delay dominates what was placed.
 */
export const MAX_POLE_TIMES_SAMPLE = 0.6;

function fmt(x: number): string {
  return Number(x.toPrecision(3)).toString();
}

/** The target in the option's own words. */
export function targetText(t: PoleTarget, withAlpha: boolean): string {
  return `wn=${fmt(t.wn)} rad/s, zeta=${fmt(t.zeta)}${withAlpha ? `, alpha=${fmt(t.alpha)}` : ''}`;
}

function placed(p: Placement, t: PoleTarget, withAlpha: boolean): RuleGains | string {
  if (!('reason' in p)) return p;
  if (Number.isNaN(p.minWn)) return `target ${targetText(t, withAlpha)} cannot be placed: ${p.reason}`;
  // Just above the limit: the gains are then small and positive.
  const ok = p.minWn * 1.05;
  return `target ${targetText(t, withAlpha)} cannot be placed: ${p.reason}; wn >= ${fmt(ok)} rad/s (zeta ${fmt(t.zeta)}${withAlpha ? `, alpha ${fmt(t.alpha)}` : ''}) can`;
}

function tooFast(t: PoleTarget, fastest: number, h: number, withAlpha: boolean): string | null {
  if (fastest * h <= MAX_POLE_TIMES_SAMPLE) return null;
  const wnMax = (MAX_POLE_TIMES_SAMPLE / h) * (t.wn / fastest);
  return `target ${targetText(t, withAlpha)} is faster than the sample time ${fmt(h)} s allows (fastest pole × h = ${fmt(fastest * h)} > ${MAX_POLE_TIMES_SAMPLE}): wn <= ${fmt(wnMax)} rad/s can`;
}

/**
 * A right-half-plane zero at z limits the crossover to about z/2 (Skogestad & Postlethwaite,
 * Multivariable Feedback Control, 2nd ed. 2005, ch. 5, from memory; reference sheet section 9);
 * the pair's natural frequency is the closed loop's bandwidth to first order, so a faster target
 * would be placed on an approximation that has turned the zero into delay. Null when none is in the way.
 */
function zeroInTheWay(t: PoleTarget, z: number, withAlpha: boolean): string | null {
  if (!(t.wn > z / 2)) return null;
  return `target ${targetText(t, withAlpha)} cannot be placed: an unstable zero in the way (the model has a right-half-plane zero at ${fmt(z)} 1/s, which allows a bandwidth below about z/2 = ${fmt(z / 2)} rad/s): wn <= ${fmt(z / 2)} rad/s can`;
}

/**
 * PI and PID rows placing `target` on a loop sampled every `h` s; `rhpZero`: the model's slowest
 * right-half-plane zero, rad/s (NaN: none).
 */
export function poleRules(target: PoleTarget, h: number, rhpZero = NaN): TuningRule[] {
  return [
    {
      id: 'pole-placement-pi',
      label: 'PI by pole placement',
      structure: 'pi',
      source: SOURCE,
      usesUltimate: false,
      apply: (i: RuleInputs) => {
        const fast = tooFast(target, target.wn, h, false) ?? zeroInTheWay(target, rhpZero, false);
        if (fast !== null) return fast;
        if (i.integrating !== null) return poleplacementIntegratingPi(i.integrating.kv, target);
        if (i.fopdt === null) return 'needs a first-order or integrating model';
        // With a delay and a complex pair: the dominant-pole design keeps the delay.
        if (i.fopdt.theta > 0 && target.zeta < 1) return placed(dominantPolePi(i.fopdt.k, i.fopdt.tau1, i.fopdt.theta, target), target, false);
        return placed(poleplacementPi(i.fopdt.k, i.fopdt.tau1, target), target, false);
      },
    },
    {
      id: 'pole-placement-pid',
      label: 'PID by pole placement',
      structure: 'pid',
      source: SOURCE,
      usesUltimate: false,
      apply: (i: RuleInputs) => {
        const fast = tooFast(target, Math.max(1, target.alpha) * target.wn, h, true) ?? zeroInTheWay(target, rhpZero, true);
        if (fast !== null) return fast;
        if (i.sopdt === null || !(i.sopdt.tau2 > 0)) return 'needs a self-regulating model with a second lag (second order approximation)';
        return placed(poleplacementPid(i.sopdt.k, i.sopdt.tau1, i.sopdt.tau2, target), target, true);
      },
    },
  ];
}

/**
 * The design leaves the approximation's effective delay out (the delay-free model is what the
 * poles are placed on): the note says how large it is against the target, for each model used,
 * and the achieved poles of the sampled loop show where the poles went.
 */
export function poleDelayNote(i: RuleInputs, t: PoleTarget): string | null {
  // The first-order PI keeps its delay (dominant-pole design) when the pair is complex.
  const used: [string, number | undefined][] = [
    ['PI', i.integrating?.theta ?? (t.zeta < 1 ? undefined : i.fopdt?.theta)],
    ['PID', i.sopdt?.theta],
  ];
  const parts = used
    .filter((u): u is [string, number] => u[1] !== undefined && u[1] > 0)
    .map(([who, theta]) => `${who} ${fmt(theta)} s (wn × theta = ${fmt(t.wn * theta)}${t.wn * theta > 0.1 ? ', moves the poles noticeably' : ''})`);
  if (parts.length === 0) return null;
  return `pole placement places the poles of the delay-free approximation; its effective delay: ${parts.join('; ')}. The achieved poles are those of the sampled loop on the full linear model`;
}
