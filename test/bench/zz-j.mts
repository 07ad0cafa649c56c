import { readFileSync } from 'node:fs';
import { loadPlant } from '../../src/model/index.js';
import { suggestGains, tuningContext, contextDesignLoop, msConstrainedPi } from '../../src/tune/index.js';
const spec = loadPlant(readFileSync(`plants/jacketed-reactor-temperature.yaml`, 'utf8'), 'j').plant!;
const ctx = tuningContext(spec);
const tau = Math.max(spec.loop.sampleTime * 20, 1);
const opts: Record<string, object> = { poles: { poles: { wn: 0.2 / tau, zeta: 0.7, alpha: 1 } }, shaping: { shaping: { crossover: 0.1 / tau, phaseMarginDeg: 55, tiTdRatio: 4 } }, ms: { maxMs: 1.4 } };
for (let k = 0; k < 3; k++) for (const [n, o] of Object.entries(opts)) { const t0 = performance.now(); const r = suggestGains(spec, { context: ctx, robustness: false, rules: [], ...o }); console.log(n, (performance.now() - t0).toFixed(0), r.suggestions.map((s) => s.rule.id).join(','), r.skipped.map((s) => s.reason.slice(0, 60)).join('|')); }
const loop = contextDesignLoop(ctx)!;
let t0 = performance.now(); msConstrainedPi(loop, 1.4, 1); console.log('ms design only', (performance.now() - t0).toFixed(0));
t0 = performance.now(); for (let i = 0; i < 100; i++) loop.ms({ ...spec.loop.controller.gains, kc: 1 + i / 100 }); console.log('100 ms()', (performance.now() - t0).toFixed(0), 'points', ctx.points.length);
