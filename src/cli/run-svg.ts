/**
 * `looprig run FILE --svg OUT.svg`: the trial plot of a run. With `--set` overrides, the file's
 * own gains are simulated too and drawn as the set in service.
 */
import { loadPlant } from '../model/index.js';
import type { Io } from './io.js';
import { simulatePlant } from './simulate-plant.js';
import { trialPlotSvg } from './trial-plot.js';
import type { RunReport } from './run-report.js';
import { writeOutput } from './write-output.js';

/** Write the plot of `report` to `out` (temp file + rename through io.writeText). */
export function writeRunSvg(report: RunReport, out: string, overridden: boolean, io: Io): void {
  let baseline: { label: string; trace: RunReport['result']['trace'] } | null = null;
  if (overridden) {
    // The file loaded cleanly a moment ago (runPlant did it), so this load cannot fail.
    const original = loadPlant(io.readText(report.file), report.file).plant;
    if (original) baseline = { label: 'in service (gains in the file)', trace: simulatePlant(original).result.trace };
  }
  const failed = report.requirements.filter((r) => r.status === 'fail').map((r) => r.name);
  const svg = trialPlotSvg({
    plant: report.plant,
    file: report.file,
    trace: report.result.trace,
    metrics: report.metrics,
    baseline,
    note: report.result.status === 'diverged' ? 'DIVERGED' : failed.length > 0 ? `FAILED: ${failed.join(', ')}` : undefined,
  });
  writeOutput(io, out, svg);
}
