import { it } from 'vitest';
import { KEY, mount, repoPlants } from './mount-app.js';
it('peek', async () => {
  const cols = Number(process.env.COLS ?? 80), rows = Number(process.env.ROWS ?? 24);
  const m = await mount(process.env.PLANT ?? 'surge-tank.yaml', { columns: cols, rows, dir: process.env.REPO ? repoPlants : undefined, caution: process.env.CAUTION === '1' });
  const keys = (process.env.KEYS ?? '').split(',').filter((k) => k !== '').map((k) => (KEY as Record<string, string>)[k] ?? k);
  for (const k of keys) await m.press(k);
  await new Promise((r) => setTimeout(r, Number(process.env.WAIT ?? 300)));
  console.log('\n' + m.frame().split('\n').map((l) => l + '|').join('\n'));
}, 60000);
