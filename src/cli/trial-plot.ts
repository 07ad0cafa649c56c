/**
 * The plot of one trial as an SVG document: setpoint, process value (and what the sensor
 * reported), controller output with the actuator limits, the requirement bands of every setpoint
 * step (settling band, overshoot limit) and an optional baseline run.
 */
import type { TrialMetrics } from '../analysis/index.js';
import { plantUnits, quantityLabel, withUnit } from '../model/index.js';
import type { PlantSpec } from '../model/types.js';
import type { Trace } from '../sim/types.js';
import { num } from './format.js';
import { svgPlot, type PlotBand, type PlotLimit, type PlotPanel, type PlotSeries } from './svg-plot.js';

export interface TrialPlotInput {
  plant: PlantSpec;
  file: string;
  trace: Trace;
  metrics: TrialMetrics;
  /** A second run to compare with (e.g. the file's own gains when --set changed them). */
  baseline?: { label: string; trace: Trace } | null;
  /** Extra subtitle text (e.g. "FAILED: settling_time"). */
  note?: string;
}

/** The colours of trial plots (shared by every plot of a trial). */
export const COLORS = {
  setpoint: '#222222',
  pv: '#1f5fbf',
  measured: '#9fc0ea',
  baseline: '#8c8c8c',
  output: '#d9731a',
  request: '#8a5a2b',
  limit: '#c62828',
  band: '#2e9d4a',
};

/** Controller values as "kc 3, ti 250 s". */
function gainsText(plant: PlantSpec): string {
  const c = plant.loop.controller;
  return Object.entries(c.values)
    .filter(([k, v]) => !(k === 'ti' && v === Infinity) && !(k === 'td' && v === 0) && !(k === 'kd' && v === 0) && !(k === 'ki' && v === 0))
    .map(([k, v]) => `${k} ${num(v)}${k === 'ti' || k === 'td' ? ' s' : ''}`)
    .join(', ');
}

/** The SVG text of a trial plot. */
export function trialPlotSvg(input: TrialPlotInput): string {
  const { plant, trace, metrics } = input;
  const n = trace.length;
  const tEnd = n > 0 ? trace.t[n - 1] : plant.loop.trial.duration;
  const t1 = Math.max(tEnd, plant.loop.trial.duration);
  const minutes = t1 >= 1200;
  const req = plant.loop.requirements;
  const bandFraction = req.settlingBand ?? 0.02;
  const units = plantUnits(plant);

  const top: PlotSeries[] = [];
  const sensor = plant.sensor;
  const sensorShows = sensor.noiseStd > 0 || sensor.delay > 0 || sensor.filterTime > 0 || sensor.resolution > 0;
  if (sensorShows) top.push({ label: 'measured (sensor)', t: trace.t, v: trace.ym, length: n, color: COLORS.measured, width: 0.9 });
  if (input.baseline) {
    const b = input.baseline.trace;
    top.push({ label: input.baseline.label, t: b.t, v: b.y, length: b.length, color: COLORS.baseline, dash: '5 3', width: 1.4 });
  }
  top.push({ label: 'process value', t: trace.t, v: trace.y, length: n, color: COLORS.pv, width: 1.8 });
  top.push({ label: 'setpoint', t: trace.t, v: trace.r, length: n, color: COLORS.setpoint, dash: '2 2', width: 1.2, step: true });

  const bands: PlotBand[] = [];
  const limits: PlotLimit[] = [];
  for (const s of metrics.steps) {
    // Around what the step is measured against: its final value once settled (analysis' target).
    const band = s.band;
    // Where the requirement says the output must be inside the band: after the settling-time limit.
    const from = req.settlingTime !== undefined ? s.at + req.settlingTime : s.at;
    if (from < s.end) {
      bands.push({
        label: `settling band ±${num(100 * bandFraction)} %${req.settlingTime !== undefined ? ' (from settling_time limit)' : ''}`,
        t0: from,
        t1: s.end,
        lo: s.target - band,
        hi: s.target + band,
        color: COLORS.band,
        opacity: 0.22,
      });
    }
    if (req.overshootPct !== undefined) {
      limits.push({
        label: `overshoot limit ${num(req.overshootPct)} %`,
        value: s.target + (req.overshootPct / 100) * (s.target - s.from),
        t0: s.at,
        t1: s.end,
        color: COLORS.limit,
        dash: '6 3',
      });
    }
  }

  const bottom: PlotSeries[] = [];
  let requestDiffers = false;
  for (let i = 0; i < n; i++) {
    if (Math.abs(trace.uc[i] - trace.u[i]) > 1e-12 * Math.max(1, Math.abs(trace.u[i]))) {
      requestDiffers = true;
      break;
    }
  }
  if (requestDiffers) {
    bottom.push({ label: 'controller request', t: trace.t, v: trace.uc, length: n, color: COLORS.request, dash: '3 2', width: 1, step: true });
  }
  bottom.push({ label: 'controller output (applied)', t: trace.t, v: trace.u, length: n, color: COLORS.output, width: 1.6, step: true });
  const outLimits: PlotLimit[] = [];
  const { min, max } = plant.actuator;
  if (Number.isFinite(min)) outLimits.push({ label: 'actuator limits', value: min, t0: 0, t1, color: COLORS.limit, dash: '4 3' });
  if (Number.isFinite(max)) outLimits.push({ label: 'actuator limits', value: max, t0: 0, t1, color: COLORS.limit, dash: '4 3' });
  if (req.maxOutput !== undefined) {
    outLimits.push({ label: `max_output ${withUnit(num(req.maxOutput), units.actuator)}`, value: req.maxOutput, t0: 0, t1, color: '#7b1fa2', dash: '1 3' });
  }

  // The axes carry the file's units; without one the quantity's name stands alone.
  const panels: PlotPanel[] = [
    { yLabel: quantityLabel('process value', units.output), series: top, bands, limits, weight: 1.6 },
    { yLabel: quantityLabel('controller output', units.actuator), series: bottom, limits: outLimits, weight: 1 },
  ];
  const c = plant.loop.controller;
  const subtitle = [
    input.file,
    `${c.named ?? c.structure} (${c.form}) ${gainsText(plant)}`,
    `sample time ${num(plant.loop.sampleTime)} s`,
    ...(input.note ? [input.note] : []),
  ].join('  ·  ');
  const markers = plant.loop.trial.events
    .filter((e) => e.kind !== 'setpoint')
    .map((e) => ({
      t: e.at,
      label:
        e.kind === 'disturbance'
          ? `${e.name} ${num(e.value)}`
          : e.kind === 'mode'
            ? e.mode
            : e.kind === 'gains'
              ? e.label
              : `ramp to ${withUnit(num(e.to), units.output)}`,
    }));
  return svgPlot({
    markers,
    title: `${plant.name}: trial`,
    subtitle,
    xLabel: minutes ? 'time (min)' : 'time (s)',
    t0: 0,
    t1,
    timeScale: minutes ? 60 : 1,
    panels,
  });
}
