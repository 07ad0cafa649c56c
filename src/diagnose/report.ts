/**
 * The diagnosis as the documented JSON document and as a readable report (strings only; the
 * command line prints them).
 */
import { withUnit } from '../model/index.js';
import type { Diagnosis, Flag } from './types.js';

const num = (v: number | null | undefined): number | null => (v === null || v === undefined || !Number.isFinite(v) ? null : v);
const fmt = (v: number | null | undefined, digits = 4): string =>
  v === null || v === undefined ? '-' : Number.isFinite(v) ? Number(v.toPrecision(digits)).toString() : v > 0 ? 'inf' : v < 0 ? '-inf' : 'n/a';

/**
 * The `--json` document: operating_point, linear (poles and zeros as [re, im], static_gain,
 * fopdt), margins, flags. Infinite or undefined numbers are null (an infinite gain margin is null
 * with `gain_margin_infinite: true`).
 */
export function diagnosisJson(d: Diagnosis): Record<string, unknown> {
  const pz = d.poleZero;
  const m = d.margins;
  return {
    plant: d.plantName,
    model_type: d.modelType,
    // The units of the output and the actuator, once: every number below is a plain number.
    units: d.units,
    operating_point: {
      setpoint: num(d.operatingPoint.setpoint),
      source: d.operatingPoint.source,
      found: d.operatingPoint.found,
      input: num(d.operatingPoint.input),
      state: d.operatingPoint.state,
      message: d.operatingPoint.message,
    },
    linear: {
      exact: d.exact,
      delay: d.linear ? d.linear.delay : null,
      poles: pz ? pz.poles.map((p) => [p.re, p.im]) : [],
      zeros: pz ? pz.zeros.map((p) => [p.re, p.im]) : [],
      static_gain: pz ? num(pz.staticGain) : null,
      modes: d.modes.map((m) => ({
        pole: [m.re, m.im],
        time_constant: num(m.timeConstant),
        natural_frequency: num(m.naturalFrequency),
        damping: num(m.damping),
      })),
      integrators: pz ? pz.integrators : null,
      slope_gain: pz && pz.integrators > 0 ? num(pz.lowFrequencyGain) : null,
      fopdt: d.fopdt
        ? { gain: num(d.fopdt.gain), time_constant: num(d.fopdt.timeConstant), delay: num(d.fopdt.delay), integrating: !Number.isFinite(d.fopdt.timeConstant), source: d.fopdtSource }
        : null,
      sopdt: d.sopdt ? { gain: num(d.sopdt.gain), time_constants: d.sopdt.timeConstants.map((t) => num(t)), delay: num(d.sopdt.delay) } : null,
    },
    margins: m
      ? {
          gain_margin: num(m.gainMargin),
          gain_margin_infinite: m.gainMargin === Infinity,
          phase_crossover_frequency: num(m.phaseCrossoverFrequency),
          phase_margin_deg: num(m.phaseMarginDeg),
          crossover_frequency: num(m.crossoverFrequency),
          delay_margin: num(m.delayMargin),
          max_sensitivity: num(m.maxSensitivity),
          max_complementary_sensitivity: num(m.maxComplementarySensitivity),
          bandwidth: num(m.bandwidth),
          closed_loop_stable: m.closedLoopStable,
          notes: m.notes,
        }
      : null,
    // The margins above are the worst of each figure over these points.
    operating_points: d.pointMargins.map((p) => ({
      point: p.description,
      from: num(p.at),
      gain_margin: p.margins ? num(p.margins.gainMargin) : null,
      phase_margin_deg: p.margins ? num(p.margins.phaseMarginDeg) : null,
      crossover_frequency: p.margins ? num(p.margins.crossoverFrequency) : null,
      max_sensitivity: p.margins ? num(p.margins.maxSensitivity) : null,
      max_complementary_sensitivity: p.margins ? num(p.margins.maxComplementarySensitivity) : null,
      bandwidth: p.margins ? num(p.margins.bandwidth) : null,
      closed_loop_stable: p.margins ? p.margins.closedLoopStable : null,
      problem: p.problem,
    })),
    trial: d.trial
      ? {
          status: d.trial.status,
          saturated_share: d.trial.saturatedFraction,
          rate_limited_share: d.trial.rateLimitedFraction,
          largest_request_beyond_limit: d.trial.largestExcess,
        }
      : null,
    flags: d.flags.map((f) => ({ kind: f.kind, severity: f.severity, evidence: cleanEvidence(f), advice: f.advice })),
    notes: d.notes,
  };
}

function cleanEvidence(f: Flag): Record<string, number | string | null> {
  const out: Record<string, number | string | null> = {};
  for (const [k, v] of Object.entries(f.evidence)) out[k] = typeof v === 'number' ? num(v) : v;
  return out;
}

/** A readable multi-line report. */
export function formatDiagnosis(d: Diagnosis): string {
  const lines: string[] = [];
  const out = (v: number | null): string => withUnit(fmt(v), d.units.output);
  const act = (v: number | null): string => withUnit(fmt(v), d.units.actuator);
  // A gain from the actuator to the output: "4.56 m per fraction"; no unit when either is missing.
  const per = d.units.output !== null && d.units.actuator !== null ? ` ${d.units.output} per ${d.units.actuator}` : '';
  lines.push(`${d.plantName} (${d.modelType})`);
  const op = d.operatingPoint;
  if (op.found) {
    const state = Object.entries(op.state)
      .map(([k, v]) => `${k} ${fmt(v)}`)
      .join(', ');
    lines.push(`operating point: output ${out(op.setpoint)} with actuator at ${act(op.input)}${state ? ` (${state})` : ''}`);
  } else {
    lines.push(`operating point: output ${out(op.setpoint)}: ${op.message ?? 'not found'}`);
  }
  const pz = d.poleZero;
  if (d.linear && pz) {
    lines.push(`${d.exact ? 'linear model' : 'linearised at the operating point'}: ${d.linear.nx} state(s), input delay ${fmt(d.linear.delay)} s`);
    lines.push(`  poles: ${pz.poles.map(root).join(', ') || 'none'}`);
    lines.push(`  zeros: ${pz.zeros.map(root).join(', ') || 'none'}`);
    lines.push(pz.integrators > 0 ? `  integrating: slope gain ${fmt(pz.lowFrequencyGain)}${per} per s` : `  static gain: ${fmt(pz.staticGain)}${per}`);
    const lags = d.modes.filter((m) => m.im === 0 && Number.isFinite(m.timeConstant)).map((m) => m.timeConstant);
    if (lags.length > 0) lines.push(`  time constants: ${lags.map((t) => `${fmt(t)} s`).join(', ')}${lags.some((t) => t < 0) ? ' (negative: unstable)' : ''}`);
    for (const m of d.modes) {
      if (m.im > 0) lines.push(`  complex pair: natural frequency ${fmt(m.naturalFrequency)} rad/s, damping ${fmt(m.damping, 3)}`);
    }
  }
  if (d.fopdt) {
    const f = d.fopdt;
    const how = d.fopdtSource === 'step_fit' ? 'fitted to a simulated 5 % step' : 'half rule';
    lines.push(
      Number.isFinite(f.timeConstant)
        ? `first order + dead time (${how}, as the controller sees it): K ${fmt(f.gain)}${per}, T ${fmt(f.timeConstant)} s, L ${fmt(f.delay)} s`
        : `integrating + dead time (${how}, as the controller sees it): K' ${fmt(f.gain)}${per} per s, L ${fmt(f.delay)} s`,
    );
  }
  const m = d.margins;
  if (m) {
    lines.push(
      `margins with the file's gains: GM ${fmt(m.gainMargin, 3)}${Number.isFinite(m.phaseCrossoverFrequency) ? ` at ${fmt(m.phaseCrossoverFrequency, 3)} rad/s` : ''}, ` +
        `PM ${fmt(m.phaseMarginDeg, 3)} deg${Number.isFinite(m.crossoverFrequency) ? ` at ${fmt(m.crossoverFrequency, 3)} rad/s` : ''}, ` +
        `Ms ${fmt(m.maxSensitivity, 3)}, Mt ${fmt(m.maxComplementarySensitivity, 3)}` +
        `; closed loop ${m.closedLoopStable === null ? 'not checked' : m.closedLoopStable ? 'stable' : 'UNSTABLE'}`,
    );
    for (const n of m.notes) lines.push(`  note: ${n}`);
  }
  if (d.pointMargins.length > 1) {
    lines.push(`operating points (the margins above are the worst of each over these):`);
    for (const p of d.pointMargins) {
      const q = p.margins;
      lines.push(
        q === null
          ? `  ${p.description} (from ${fmt(p.at)} s): ${p.problem ?? 'no linear model'}`
          : `  ${p.description} (from ${fmt(p.at)} s): GM ${fmt(q.gainMargin, 3)}, PM ${fmt(q.phaseMarginDeg, 3)} deg, Ms ${fmt(q.maxSensitivity, 3)}` +
              `${q.closedLoopStable === false ? ', UNSTABLE' : ''}`,
      );
    }
  }
  if (d.trial) {
    lines.push(
      `trial: ${d.trial.status}; actuator at a limit ${fmt(100 * d.trial.saturatedFraction, 3)} % of the time, rate-limited ${fmt(100 * d.trial.rateLimitedFraction, 3)} %`,
    );
  }
  lines.push('');
  if (d.flags.length === 0) lines.push('flags: none — a well-behaved loop for plain PID');
  else {
    lines.push(`flags (${d.flags.length}):`);
    for (const f of d.flags) {
      const ev = Object.entries(f.evidence)
        .filter(([, v]) => v !== null)
        .map(([k, v]) => `${k}=${typeof v === 'number' ? fmt(v) : v}`)
        .join(' ');
      lines.push(`  [${f.severity}] ${f.kind}${ev ? `  ${ev}` : ''}`);
      lines.push(`      ${f.advice}`);
    }
  }
  for (const n of d.notes) lines.push(`note: ${n}`);
  return lines.join('\n') + '\n';
}

function root(r: { re: number; im: number }): string {
  if (r.im === 0) return fmt(r.re);
  return `${fmt(r.re)}${r.im > 0 ? '+' : '-'}${fmt(Math.abs(r.im))}i`;
}
