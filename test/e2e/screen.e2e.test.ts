/**
 * The screen end to end in a real terminal (tmux), as a person retuning over SSH meets it: the
 * compiled `looprig` at 80x24 shows the controller output and the margins from the start; Ctrl-C
 * quits from every overlay and from inside the caution and the value prompt; no line is wider
 * than the terminal at 80x24, 100x32 and 60x20; at 40x12 it says the terminal is too small.
 *
 * Skipped, with a message, only when tmux is not installed.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildBin, REPO_ROOT as root } from '../helpers/build-bin.js';
import { HAS_TMUX, tmuxServer } from '../helpers/tmux.js';

const hasTmux = HAS_TMUX;
if (!hasTmux) console.warn('screen e2e: tmux is not installed, the end-to-end screen test is skipped');

const server = tmuxServer('looprig-screen-e2e');
const tmux = server.run;
const pane = server.pane;
let work = '';
let bin = '';

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));
/** Keys as tmux names them ('C-c', 'Enter', 'Down') or literal characters. */
const send = (session: string, key: string, literal = false): void => void tmux('send-keys', '-t', session, ...(literal ? ['-l', key] : [key]));

/** `looprig plants/surge-tank.yaml` in a new session of this size; its exit status goes to a file. */
function start(session: string, columns: number, rows: number): string {
  const exitFile = join(work, `exit-${session}`);
  // CI variables make Ink hold every frame back until exit: a person's terminal has none.
  const command = [
    `cd '${root}'`,
    `env -u CI -u CONTINUOUS_INTEGRATION TERM=xterm-256color '${process.execPath}' '${bin}' plants/surge-tank.yaml`,
    `echo EXIT=$? > '${exitFile}'`,
    'sleep 120',
  ].join('; ');
  tmux('new-session', '-d', '-s', session, '-x', String(columns), '-y', String(rows), command);
  return exitFile;
}

async function waitFor(session: string, pred: (text: string) => boolean, what: string, ms = 40000): Promise<string> {
  const end = Date.now() + ms;
  for (;;) {
    const text = pane(session);
    if (pred(text)) return text;
    if (Date.now() > end) throw new Error(`${session}: timed out waiting for ${what}; the pane shows:\n${text}`);
    await sleep(150);
  }
}

async function exitStatus(exitFile: string, ms = 60000): Promise<string> {
  const end = Date.now() + ms;
  while (!existsSync(exitFile) && Date.now() < end) await sleep(100);
  return existsSync(exitFile) ? readFileSync(exitFile, 'utf8').trim() : 'no exit';
}

function noLineWider(text: string, columns: number, what: string): void {
  for (const line of text.split('\n')) expect(line.length, `${what}: '${line}'`).toBeLessThanOrEqual(columns);
}

beforeAll(() => {
  if (!hasTmux) return;
  work = mkdtempSync(join(tmpdir(), 'looprig-screen-e2e-'));
  bin = buildBin('e2e-screen').bin;
}, 300_000);

afterAll(() => {
  if (hasTmux) server.kill();
  if (work !== '') rmSync(work, { recursive: true, force: true });
});

describe.skipIf(!hasTmux)('screen end to end in tmux', () => {
  it('80x24: controller output and margins from the start; then 100x32, 60x20 fit; 40x12 says too small', async () => {
    start('sizes', 80, 24);
    await waitFor('sizes', (t) => t.includes('press any key to continue'), 'the caution');
    send('sizes', 'x', true);
    let text = await waitFor('sizes', (t) => /GM \S+ {1,2}PM \S+ {1,2}Ms \S+/.test(t), 'the margins');
    expect(text).toContain('Controller output');
    expect(text).toContain('Trial trend');
    noLineWider(text, 80, '80x24');
    for (const [c, r] of [
      [100, 32],
      [60, 20],
    ] as const) {
      tmux('resize-window', '-t', 'sizes', '-x', String(c), '-y', String(r));
      text = await waitFor('sizes', (t) => t.split('\n').length >= r - 1 && t.split('\n')[0].length <= c && t.includes('Gain set'), `${c}x${r}`);
      await sleep(400);
      text = pane('sizes');
      noLineWider(text, c, `${c}x${r}`);
      expect(text.split('\n').filter((l) => l.trim() !== '').at(-1), `${c}x${r} hint`).toMatch(/q quit\s*$/);
    }
    tmux('resize-window', '-t', 'sizes', '-x', '40', '-y', '12');
    text = await waitFor('sizes', (t) => t.includes('Terminal too small'), 'the too-small notice');
    noLineWider(text, 40, '40x12');
    expect(text.replace(/\s+/g, ' ')).toContain('Terminal too small (40x12): the charts need 60x14');
    send('sizes', 'C-c');
    expect(await exitStatus(join(work, 'exit-sizes'))).toBe('EXIT=0');
  }, 180_000);

  it('Ctrl-C quits from the caution, every overlay and the value prompt; with unsaved changes it asks first', async () => {
    // Overlay -> the keys that open it after the caution, and text that shows it is open.
    const cases: [string, string[], string][] = [
      ['caution', [], 'press any key to continue'],
      ['help', ['?'], 'Edit the gain set'],
      ['rules', ['p'], 'Tuning rules'],
      ['optimiser', ['O'], 'ptimis'],
      ['prompt', ['Enter'], 'Enter accept, Esc cancel'],
      ['save', ['w'], '(y/n)'],
    ];
    // Started together: the machine is shared and each start takes seconds.
    for (const [name] of cases) start(name, 80, 24);
    start('dirty', 80, 24);
    for (const [name, keys, open] of cases) {
      await waitFor(name, (t) => t.includes('press any key to continue'), `${name}: the caution`);
      if (keys.length > 0) {
        send(name, 'x', true);
        await waitFor(name, (t) => t.includes('Trial trend'), `${name}: the screen`);
        for (const k of keys) send(name, k, k.length === 1);
      }
      await waitFor(name, (t) => t.includes(open), `${name}: the overlay`);
      send(name, 'C-c');
      expect(await exitStatus(join(work, `exit-${name}`)), name).toBe('EXIT=0');
    }
    // Unsaved changes: inside the rule list Ctrl-C asks; a second Ctrl-C is the yes.
    await waitFor('dirty', (t) => t.includes('press any key to continue'), 'dirty: the caution');
    send('dirty', 'x', true);
    await waitFor('dirty', (t) => t.includes('Trial trend'), 'dirty: the screen');
    send('dirty', ']', true);
    await waitFor('dirty', (t) => t.includes('[unsaved]'), 'dirty: the edit');
    send('dirty', 'p', true);
    await waitFor('dirty', (t) => t.includes('Tuning rules'), 'dirty: the rule list');
    send('dirty', 'C-c');
    await waitFor('dirty', (t) => t.includes('Quit without saving? (y/n)'), 'dirty: the question');
    send('dirty', 'C-c');
    expect(await exitStatus(join(work, 'exit-dirty'))).toBe('EXIT=0');
  }, 240_000);
});
