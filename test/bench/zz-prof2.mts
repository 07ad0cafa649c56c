import { readFileSync } from 'node:fs';
import { loadPlant } from '../../src/model/index.js';
import { suggestGains, tuningContext } from '../../src/tune/index.js';
const f = process.argv[2]; const what = process.argv[3];
const spec = loadPlant(readFileSync(`/work/wt/design/plants/${f}.yaml`, 'utf8'), f).plant!;
const ctx = tuningContext(spec);
const tau = Math.max(spec.loop.sampleTime * 20, 1);
const o: any = what === 'poles' ? { poles: { wn: 0.2 / tau, zeta: 0.7, alpha: 1 } } : { shaping: { crossover: 0.1 / tau, phaseMarginDeg: 55, tiTdRatio: 4 } };
for (let i = 0; i < 10; i++) suggestGains(spec, { context: ctx, robustness: false, rules: [], ...o });
