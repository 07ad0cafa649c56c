/**
 * The screen end to end, as a person uses it: the built `looprig` in a real terminal (tmux,
 * 80x24), keys sent, the pane read back. Raises the proportional gain and checks that the shown
 * gain and the shown overshoot both change, resizes to 120x40 and back, opens the tuning-rule list
 * and leaves it, quits and checks the exit status and that the terminal was given back (alternate
 * screen left, cursor shown). Opens the frequency view and closes it.
 *
 * Skipped, with a message, only when tmux is not installed.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, writeFileSync, copyFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { HAS_TMUX, tmuxServer } from '../helpers/tmux.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const hasTmux = HAS_TMUX;
if (!hasTmux) console.warn('tui e2e: tmux is not installed, the end-to-end screen test is skipped');

const server = tmuxServer('looprig-e2e');
let work = '';
let bin = '';
let buildReport = '';

function newestSource(dir: string): number {
  let newest = 0;
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    const st = statSync(p);
    newest = Math.max(newest, st.isDirectory() ? newestSource(p) : st.mtimeMs);
  }
  return newest;
}

/** dist/cli/bin.js when it is newer than every source file; otherwise a fresh build in a temp folder. */
function builtBin(): string {
  const dist = join(root, 'dist', 'cli', 'bin.js');
  if (existsSync(dist) && existsSync(join(root, 'dist', 'tui', 'index.js')) && statSync(dist).mtimeMs > newestSource(join(root, 'src'))) {
    return dist;
  }
  const pkg = join(work, 'pkg');
  spawnSync('mkdir', ['-p', pkg]);
  copyFileSync(join(root, 'package.json'), join(pkg, 'package.json'));
  symlinkSync(join(root, 'node_modules'), join(pkg, 'node_modules'), 'dir');
  symlinkSync(join(root, 'plants'), join(pkg, 'plants'), 'dir');
  const tsconfig = {
    extends: join(root, 'tsconfig.json'),
    compilerOptions: { noEmit: false, declaration: false, typeRoots: [join(root, 'node_modules', '@types')], rootDir: join(root, 'src'), outDir: join(pkg, 'dist') },
    include: [],
    files: [join(root, 'src', 'cli', 'bin.ts')],
  };
  writeFileSync(join(pkg, 'tsconfig.json'), JSON.stringify(tsconfig));
  const tsc = spawnSync(process.execPath, [join(root, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', join(pkg, 'tsconfig.json')], { encoding: 'utf8' });
  const out = join(pkg, 'dist', 'cli', 'bin.js');
  // Type errors are the type-check's business (npm test runs tsc first); tsc still emits, and
  // whether that program works is what this test finds out. Keep the report for failures.
  buildReport = tsc.status === 0 ? '' : `\n(tsc reported, status ${tsc.status}:\n${tsc.stdout}${tsc.stderr})`;
  if (!existsSync(out)) throw new Error(`tsc emitted no bin (${tsc.status}):\n${tsc.stdout}${tsc.stderr}`);
  return out;
}

const tmux = server.run;

/** Type characters literally (tmux would read some, like ']', as key names). */
const type = (chars: string): void => {
  for (const c of chars) tmux('send-keys', '-t', 'screen', '-l', c);
};
const pane = (session = 'screen'): string => server.pane(session);

/** Start `looprig ARGS` in a new 80x24 session; the shell writes EXIT=<status> to `exitFile` after it. */
function start(session: string, args: string, exitFile: string): void {
  // CI variables make Ink hold every frame back until exit: a person's terminal has none.
  const command = [
    `cd '${root}'`,
    `env -u CI -u CONTINUOUS_INTEGRATION TERM=xterm-256color '${process.execPath}' '${bin}' ${args}`,
    `echo EXIT=$? > '${exitFile}'`,
    'sleep 120',
  ].join('; ');
  tmux('new-session', '-d', '-s', session, '-x', '80', '-y', '24', command);
}

async function exitStatus(exitFile: string): Promise<string> {
  const end = Date.now() + 15000;
  while (!existsSync(exitFile) && Date.now() < end) await sleep(100);
  return existsSync(exitFile) ? readFileSync(exitFile, 'utf8').trim() : 'no exit';
}

/** Alternate screen off and cursor shown: the terminal was given back. */
const restored = (session: string): string => tmux('display-message', '-p', '-t', session, '#{alternate_on} #{cursor_flag}').trim();
const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

async function waitFor(pred: (text: string) => boolean, what: string, ms = 20000, session = 'screen'): Promise<string> {
  const end = Date.now() + ms;
  let text = '';
  for (;;) {
    text = pane(session);
    if (pred(text)) return text;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}; the pane shows:\n${text}${buildReport}`);
    await sleep(100);
  }
}

const kcShown = (text: string): string | null => /^> Kc\s+(\S+)/m.exec(text)?.[1] ?? null;
const overshootShown = (text: string): string | null => /│overshoot\s+(?:[≤≥] \S+ %\s+)?(\S+ %)/.exec(text)?.[1] ?? null;

beforeAll(() => {
  if (!hasTmux) return;
  work = mkdtempSync(join(tmpdir(), 'looprig-e2e-'));
  bin = builtBin();
}, 180_000);

afterAll(() => {
  if (hasTmux) server.kill();
  if (work !== '') rmSync(work, { recursive: true, force: true });
});

describe.skipIf(!hasTmux)('tui end to end in tmux', () => {
  it('raise Kc, see gain and overshoot change, resize, quit, terminal restored', async () => {
    const exitFile = join(work, 'exit');
    start('screen', 'plants/surge-tank.yaml', exitFile);

    // The safety caution comes first; any key goes on.
    await waitFor((t) => t.includes('press any key to continue'), 'the safety caution');
    type('x');
    let text = await waitFor((t) => kcShown(t) !== null && overshootShown(t) !== null, 'the gain and metrics panels');
    // At 80x24, from the start: the valve against its limits and the margins of the edited gains.
    text = await waitFor((t) => /│GM \S+ {2}PM \S+ {2}Ms \S+/.test(t), 'the margins line');
    expect(text).toContain('Controller output');
    for (const line of text.split('\n')) expect(line.length).toBeLessThanOrEqual(80);
    const kc0 = kcShown(text);
    const os0 = overshootShown(text);

    // Raise the proportional gain: three coarse steps of 10 %.
    type(']]]');
    text = await waitFor((t) => kcShown(t) !== kc0 && t.includes('[unsaved]'), 'the raised gain');
    await sleep(300);
    text = pane();
    expect(Number(kcShown(text))).toBeCloseTo(Number(kc0) * 1.331, 3);
    expect(overshootShown(text)).not.toBe(os0);
    const kcRaised = kcShown(text);

    // Bigger terminal: more panels; back to 80x24: the small layout again, intact.
    tmux('resize-window', '-t', 'screen', '-x', '120', '-y', '40');
    text = await waitFor((t) => t.includes('Controller output') && t.includes('Notices'), 'the large layout');
    for (const line of text.split('\n')) expect(line.length).toBeLessThanOrEqual(120);
    tmux('resize-window', '-t', 'screen', '-x', '80', '-y', '24');
    text = await waitFor((t) => !t.includes('Notices') && t.includes('Trial trend') && t.includes('Controller output'), 'the small layout');
    await sleep(300);
    text = pane();
    const lines = text.split('\n');
    for (const line of lines) expect(line.length).toBeLessThanOrEqual(80);
    expect(lines[0]).toMatch(/^surge-tank\.yaml \[unsaved\] │ instant/);
    expect(lines[22]).toContain('? keys');
    expect(kcShown(text)).toBe(kcRaised);
    expect(text.match(/Gain set/g)).toHaveLength(1);
    expect(text.match(/Trial trend/g)).toHaveLength(1);

    // The rule list replaces the panels at 80x24, with the oscillation caution; Esc goes back.
    type('p');
    text = await waitFor((t) => /· \d+ rules /.test(t), 'the rule list');
    for (const line of text.split('\n')) expect(line.length).toBeLessThanOrEqual(80);
    expect(text).toContain('Caution: a relay test');
    expect(text).not.toContain('Gain set');
    tmux('send-keys', '-t', 'screen', 'Escape');
    text = await waitFor((t) => t.includes('Gain set') && t.includes('Trial trend'), 'the main screen again');
    expect(kcShown(text)).toBe(kcRaised);

    // Quit: unsaved changes, so it asks first.
    type('q');
    await waitFor((t) => t.includes('Quit without saving? (y/n)'), 'the quit question');
    type('y');
    expect(await exitStatus(exitFile)).toBe('EXIT=0');
    // The terminal is given back: main screen, cursor visible.
    expect(restored('screen')).toBe('0 1');
  }, 120_000);

  it('Ctrl-C with nothing to save quits at once; SIGTERM ends it with 143; both give the terminal back', async () => {
    const ctrlc = join(work, 'exit-ctrlc');
    const term = join(work, 'exit-term');
    start('ctrlc', 'plants/surge-tank.yaml', ctrlc);
    start('term', 'plants/surge-tank.yaml', term);
    await waitFor((t) => t.includes('press any key to continue'), 'the caution (ctrlc)', 30000, 'ctrlc');
    await waitFor((t) => t.includes('press any key to continue'), 'the caution (term)', 30000, 'term');
    tmux('send-keys', '-t', 'ctrlc', 'x');
    await waitFor((t) => t.includes('Trial trend'), 'the screen after the caution', 20000, 'ctrlc');
    tmux('send-keys', '-t', 'ctrlc', 'C-c');
    expect(await exitStatus(ctrlc)).toBe('EXIT=0');
    expect(restored('ctrlc')).toBe('0 1');

    // The screen process is the child of the session's shell.
    const shell = tmux('display-message', '-p', '-t', 'term', '#{pane_pid}').trim();
    const child = spawnSync('ps', ['-o', 'pid=', '--ppid', shell], { encoding: 'utf8' }).stdout.trim().split(/\s+/)[0];
    expect(child).toMatch(/^\d+$/);
    process.kill(Number(child), 'SIGTERM');
    expect(await exitStatus(term)).toBe('EXIT=143');
    expect(restored('term')).toBe('0 1');
  }, 120_000);

  it('the frequency view at 80x24: opens on F, shows the crossover and Ms, fits, closes with Esc', async () => {
    const exitFile = join(work, 'exit-freq');
    start('freq', 'plants/drum-level.yaml', exitFile);
    await waitFor((t) => t.includes('press any key to continue'), 'the caution', 30000, 'freq');
    tmux('send-keys', '-t', 'freq', '-l', 'x');
    await waitFor((t) => t.includes('Trial trend'), 'the main screen', 20000, 'freq');
    tmux('send-keys', '-t', 'freq', '-l', 'F');
    let text = await waitFor((t) => t.includes('Frequency view') && /ωc \d\S* rad\/s/.test(t) && /Ms \d/.test(t), 'the frequency view', 20000, 'freq');
    for (const line of text.split('\n')) expect(line.length).toBeLessThanOrEqual(80);
    expect(text).toContain('|L| dB');
    expect(text).toMatch(/[\u2801-\u28ff]/);
    tmux('send-keys', '-t', 'freq', 'Escape');
    text = await waitFor((t) => !t.includes('Frequency view') && t.includes('Trial trend'), 'the main screen again', 20000, 'freq');
    tmux('send-keys', '-t', 'freq', 'C-c');
    expect(await exitStatus(exitFile)).toBe('EXIT=0');
    expect(restored('freq')).toBe('0 1');
  }, 120_000);

  it('a plant file that fails to load: FILE:LINE:COL on the terminal, exit 2, no stack trace', async () => {
    const exitFile = join(work, 'exit-bad');
    start('bad', 'test/fixtures/bad/unknown-type.yaml', exitFile);
    expect(await exitStatus(exitFile)).toBe('EXIT=2');
    const text = pane('bad');
    expect(text).toMatch(/test\/fixtures\/bad\/unknown-type\.yaml:\d+:\d+: /);
    expect(text).not.toMatch(/^\s+at /m);
    expect(restored('bad')).toBe('0 1');
  }, 60_000);
});
