/**
 * Mounting the screen in-process for component tests (ink-testing-library): a plant file, a fake
 * file store, key presses that wait for the frame they cause.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { render } from 'ink-testing-library';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { App, type ScreenIo } from '../../src/tui/app.js';
import { setupLoop } from '../../src/tui/engine.js';
import { NO_DIAGNOSIS, type NoticeSource } from '../../src/tui/notices.js';

export const fixtures = join(import.meta.dirname, '..', 'fixtures', 'plants');
export const repoPlants = join(import.meta.dirname, '..', '..', 'plants');
export const tuiFixtures = join(import.meta.dirname, 'fixtures');

export const KEY = { up: '\u001b[A', down: '\u001b[B', right: '\u001b[C', left: '\u001b[D', enter: '\r', esc: '\u001b', backspace: '\u007f', ctrlC: '\u0003' };

export const tick = (ms = 50): Promise<void> => new Promise((r) => setTimeout(r, ms));

/**
 * Wait until `pred` holds (effects such as a save or quit run after the frame; on a busy machine
 * that can take longer than one tick). Fails with the last frame if it never does.
 */
export async function until(pred: () => boolean, what: string, frame: () => string, ms = 3000): Promise<void> {
  const end = Date.now() + ms;
  while (!pred()) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}; frame:\n${frame()}`);
    await tick(20);
  }
}

export interface Mounted {
  frame(): string;
  /** Every frame drawn so far, oldest first. */
  frames(): string[];
  press(...keys: string[]): Promise<void>;
  files: Map<string, string>;
  writes: { path: string; text: string }[];
  /** Set to make the next writes fail with this error, or answer with these notes. */
  io: { writeError: Error | null; readError: Error | null; notes: string[] };
  exits: number[];
}

export async function mount(
  name: string,
  opts: { columns?: number; rows?: number; color?: boolean; caution?: boolean; notices?: NoticeSource | ((plant: PlantSpec) => NoticeSource); dir?: string } = {},
): Promise<Mounted> {
  const text = readFileSync(join(opts.dir ?? fixtures, name), 'utf8');
  const loaded = loadPlant(text, name);
  if (loaded.plant === undefined) throw new Error(`${name} does not load`);
  const files = new Map([[name, text]]);
  const writes: { path: string; text: string }[] = [];
  const exits: number[] = [];
  const behaviour: Mounted['io'] = { writeError: null, readError: null, notes: [] };
  const io: ScreenIo = {
    readText: (p) => {
      if (behaviour.readError !== null) throw behaviour.readError;
      const t = files.get(p);
      if (t === undefined) throw Object.assign(new Error(`ENOENT: no such file or directory, open '${p}'`), { code: 'ENOENT' });
      return t;
    },
    writeText: (p, t) => {
      if (behaviour.writeError !== null) throw behaviour.writeError;
      writes.push({ path: p, text: t });
      files.set(p, t);
      return { notes: behaviour.notes };
    },
  };
  const app = render(
    <App
      setup={setupLoop(loaded.plant)}
      filePath={name}
      fileName={name}
      text={text}
      io={io}
      notices={typeof opts.notices === 'function' ? opts.notices(loaded.plant) : (opts.notices ?? NO_DIAGNOSIS)}
      color={opts.color ?? false}
      caution={opts.caution ?? false}
      size={{ columns: opts.columns ?? 80, rows: opts.rows ?? 24 }}
      onExit={(c) => exits.push(c)}
    />,
  );
  await tick(60);
  return {
    frame: () => app.lastFrame() ?? '',
    frames: () => app.frames,
    press: async (...keys) => {
      // Each key: wait for the frame it causes (a busy machine can take a while), then a little
      // more so the effects of that frame (a newly shown text field subscribing) have run.
      for (const k of keys) {
        const n = app.stdout.frames.length;
        app.stdin.write(k);
        const end = Date.now() + 1500;
        while (app.stdout.frames.length === n && Date.now() < end) await tick(5);
        await tick(30);
      }
    },
    files,
    writes,
    io: behaviour,
    exits,
  };
}

/** The value shown for a parameter in the gain panel, e.g. shown(frame, 'Kc') -> '2'. */
export function shown(frame: string, symbol: string): string | null {
  const m = new RegExp(`^[> ] ${symbol.replace("'", "\\'")}\\s+(\\S+)`, 'm').exec(frame);
  return m === null ? null : m[1];
}

/** The figure shown in the metrics panel for a row label. */
export function figure(frame: string, label: string): string | null {
  const m = new RegExp(`│${label}\\s+(?:[≤≥] \\S+ \\S*\\s+)?(\\S+(?: %| s)?)`).exec(frame);
  return m === null ? null : m[1];
}

