/**
 * The `valve_stiction_cycle` flag: the limit cycle the actuator's stiction or backlash band
 * sustains with the file's gains, predicted at every operating point of the trial (loop/'s points,
 * the models check and the screen read), the worst (largest measurement swing) reported, with
 * advice on what helps. The prediction is analysis' valveCycle: the stick-slip balance where its
 * assumptions hold (a self-regulating loop under integral action whose stem rests long enough for
 * the measurement to settle), else the describing function.
 */
import { valveBand, valveCycle, type CycleLoop, type LimitCycle } from '../analysis/index.js';
import type { PreparedPoint } from '../loop/index.js';
import { plantUnits, withUnit } from '../model/index.js';
import type { GainSet, PlantSpec } from '../model/types.js';
import type { Flag } from './types.js';

function fmt(v: number, digits = 3): string {
  return Number.isFinite(v) ? String(Number(v.toPrecision(digits))) : String(v);
}

/** The flag, or null when the valve has no band, the point no linear model, or no cycle is predicted. */
export function flagValveCycle(spec: PlantSpec, points: readonly PreparedPoint[], gains: GainSet): Flag | null {
  const band = valveBand(spec.actuator);
  if (band === null) return null;
  // The valve's slope and the plant's gain change with the level: a cycle may appear at one only.
  let worst: { cycle: LimitCycle; at: PreparedPoint; balance: boolean } | null = null;
  let cycling = 0;
  for (const at of points) {
    if (at.response === null || at.point.linear === null) continue;
    const loop: CycleLoop = { plant: at.response, gains, sampleTime: spec.loop.sampleTime, sensor: spec.sensor };
    const predicted = valveCycle(at.point.linear, band, loop);
    if (predicted === null) continue;
    cycling++;
    const { cycle } = predicted;
    if (worst === null || cycle.outputAmplitude > worst.cycle.outputAmplitude) worst = { cycle, at, balance: predicted.method === 'stick_slip_balance' };
  }
  if (worst === null) return null;
  const { cycle, at, balance } = worst;
  const isBacklash = band.static === band.dynamic;
  const units = plantUnits(spec);
  const integral = Number.isFinite(gains.ti);
  return {
    kind: 'valve_stiction_cycle',
    severity: 'warning',
    evidence: {
      static_band: band.static,
      dynamic_band: band.dynamic,
      predicted_output_amplitude: cycle.outputAmplitude,
      predicted_controller_amplitude: cycle.amplitude,
      predicted_period_s: cycle.period,
      method: balance ? 'stick_slip_balance' : 'describing_function',
      at_setpoint: at.point.level,
      points_cycling: cycling,
      points_evaluated: points.filter((p) => p.response !== null && p.point.linear !== null).length,
    },
    advice:
      `The valve's ${isBacklash ? 'backlash' : 'stiction'} (static band ${withUnit(fmt(band.static), units.actuator)}, dynamic ${withUnit(fmt(band.dynamic), units.actuator)}) and these gains sustain a limit cycle: ` +
      `the measurement swings about \u00b1${withUnit(fmt(cycle.outputAmplitude), units.output)} with a period near ${fmt(cycle.period)} s at setpoint ${withUnit(fmt(at.point.level), units.output)}` +
      `${cycling > 1 ? `, the worst of ${cycling} operating points that cycle` : ''}` +
      ` (${balance ? 'stick-slip balance: the stem rests while the integral winds across the band' : 'describing-function prediction, first harmonic'}). ` +
      'Retuning does not cure it, and more integral action (a shorter ti) makes it worse. ' +
      (integral
        ? 'On a self-regulating plant P-only control, or PI with a much longer ti, stops the cycle at the price of an offset or a slow loop; '
        : '') +
      'the fix is the valve: maintenance (packing, positioner), or a valve without the band.',
  };
}
