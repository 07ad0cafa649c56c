/**
 * The plot of a diff as an SVG document: both trials' process values and both controller outputs
 * overlaid (before dashed, after solid), and the switch rehearsal below with its switch marked.
 */
import type { DiffReport } from './diff-report.js';
import { num } from './format.js';
import { svgPlot, type PlotPanel, type PlotSeries } from './svg-plot.js';
import { plantUnits, quantityLabel } from '../model/index.js';
import { COLORS } from './trial-plot.js';

const REHEARSAL = '#2e7d32';

/** The SVG text of a diff plot. */
export function diffSvg(r: DiffReport): string {
  const after = r.after.evaluation!.check.nominal.result.trace;
  const before = r.before.evaluation?.check.nominal.result.trace ?? null;
  const plant = r.after.plant!;
  const t1 = Math.max(plant.loop.trial.duration, r.before.plant?.loop.trial.duration ?? 0);
  const minutes = t1 >= 1200;
  const units = plantUnits(plant);
  const top: PlotSeries[] = [];
  const bottom: PlotSeries[] = [];
  if (before !== null) {
    top.push({ label: 'process value before', t: before.t, v: before.y, length: before.length, color: COLORS.baseline, dash: '5 3', width: 1.4 });
    bottom.push({ label: 'controller output before', t: before.t, v: before.u, length: before.length, color: COLORS.baseline, dash: '5 3', width: 1.2, step: true });
  }
  top.push({ label: 'process value after', t: after.t, v: after.y, length: after.length, color: COLORS.pv, width: 1.8 });
  top.push({ label: 'setpoint (after)', t: after.t, v: after.r, length: after.length, color: COLORS.setpoint, dash: '2 2', width: 1.1, step: true });
  bottom.push({ label: 'controller output after', t: after.t, v: after.u, length: after.length, color: COLORS.output, width: 1.5, step: true });
  const panels: PlotPanel[] = [
    { yLabel: quantityLabel('process value', units.output), series: top, weight: 1.5 },
    { yLabel: quantityLabel('controller output', units.actuator), series: bottom, weight: 1 },
  ];
  const markers = [];
  const h = r.rehearsal;
  if (h !== null) {
    const t = h.run.result.trace;
    panels.push({
      yLabel: quantityLabel('rehearsal: output', units.output),
      series: [
        { label: 'rehearsal: old gains, then new', t: t.t, v: t.y, length: t.length, color: REHEARSAL, width: 1.6 },
        { label: 'setpoint', t: t.t, v: t.r, length: t.length, color: COLORS.setpoint, dash: '2 2', width: 1.1, step: true },
      ],
      weight: 1.2,
    });
    panels.push({
      yLabel: quantityLabel('rehearsal: controller', units.actuator),
      series: [{ label: 'rehearsal controller output', t: t.t, v: t.u, length: t.length, color: REHEARSAL, dash: '4 2', width: 1.3, step: true }],
      weight: 0.8,
    });
    if (h.run.bump !== null) markers.push({ t: h.run.bump.at, label: 'rehearsal: switch to new gains' });
  }
  return svgPlot({
    title: `${plant.name}: before -> after`,
    subtitle: [`${r.before.plant === null ? '(new file)' : r.before.label} -> ${r.after.label}`, `${r.newlyFailing} newly failing`, h?.run.bump ? `switch at ${num(h.run.bump.at)} s` : r.rehearsalNote].join('  ·  '),
    xLabel: minutes ? 'time (min)' : 'time (s)',
    t0: 0,
    t1,
    timeScale: minutes ? 60 : 1,
    panels,
    markers,
    height: h !== null ? 820 : 620,
  });
}
