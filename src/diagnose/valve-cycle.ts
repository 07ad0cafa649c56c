/**
 * The `valve_stiction_cycle` flag: the limit cycle the actuator's stiction or backlash band
 * sustains with the file's gains, predicted by the describing-function method (analysis'
 * stiction-cycle.ts) at the first operating point of the trial, with advice on what helps.
 */
import { predictLimitCycle, stictionElement, valveBand } from '../analysis/index.js';
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
  const at = points.find((p) => p.response !== null);
  if (at === undefined || at.response === null) return null;
  const cycle = predictLimitCycle(stictionElement(band), (band.static + band.dynamic) / 2, {
    plant: at.response,
    gains,
    sampleTime: spec.loop.sampleTime,
    sensor: spec.sensor,
  });
  if (cycle === null) return null;
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
      at_setpoint: at.point.level,
    },
    advice:
      `The valve's ${isBacklash ? 'backlash' : 'stiction'} (static band ${withUnit(fmt(band.static), units.actuator)}, dynamic ${withUnit(fmt(band.dynamic), units.actuator)}) and these gains sustain a limit cycle: ` +
      `the measurement swings about \u00b1${withUnit(fmt(cycle.outputAmplitude), units.output)} with a period near ${fmt(cycle.period)} s (describing-function prediction, first harmonic). ` +
      'Retuning does not cure it, and more integral action (a shorter ti) makes it worse. ' +
      (integral
        ? 'On a self-regulating plant P-only control, or PI with a much longer ti, stops the cycle at the price of an offset or a slow loop; '
        : '') +
      'the fix is the valve: maintenance (packing, positioner), or a valve without the band.',
  };
}
