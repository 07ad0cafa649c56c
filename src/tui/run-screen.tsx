/**
 * Entry point of the terminal screen: load the plant file, take over the terminal (alternate
 * screen, raw keys), run the app, and give the terminal back however the screen ends: quit,
 * Ctrl-C, SIGTERM, SIGHUP, SIGINT or a crash.
 */
import { basename } from 'node:path';
import { render } from 'ink';
import { formatDiagnostic, loadPlant } from '../model/index.js';
import { DEFAULT_BUDGET, plantBudget } from '../sim/index.js';
import { App, type ScreenIo } from './app.js';
import { setupLoop } from './engine.js';
import { diagnoseSource } from './diagnose-source.js';
import { withNotices, type Notice, type NoticeSource } from './notices.js';
import type { RunMode } from './state.js';
import { colorWanted } from './theme.js';

export interface ScreenOptions {
  /** File access: the CLI passes its reader and its writer (links, modes, owners kept). */
  io: ScreenIo;
  stdin?: NodeJS.ReadStream;
  stdout?: NodeJS.WriteStream;
  stderr?: NodeJS.WriteStream;
  env?: Readonly<Record<string, string | undefined>>;
  /** Where diagnosis flags and margins come from (default: the diagnose core on this plant). */
  notices?: NoticeSource;
  /** Show the safety caution first (default true: once per session). */
  caution?: boolean;
  mode?: RunMode;
  /**
   * The resource budget (sim/budget.ts): lifted or not, and what to tell the user who wants it
   * lifted (the command line's option). Default: kept, no hint.
   */
  budget?: { lifted: boolean; hint: string };
}

/** Exit status after SIGTERM / SIGHUP (128 + signal number, shell convention). */
const SIGNAL_EXIT: Record<string, number> = { SIGTERM: 143, SIGHUP: 129, SIGINT: 130 };

const ENTER_ALT = '\u001b[?1049h\u001b[H';
const LEAVE_ALT = '\u001b[?1049l';
const SHOW_CURSOR = '\u001b[?25h';

/**
 * Open the screen on a plant file. Resolves with the exit status: 0 after quitting, 2 when the
 * file cannot be read or loaded (its FILE:LINE:COL messages on stderr, no stack trace), 128+n
 * after a terminating signal.
 */
export async function runScreen(filePath: string, options: ScreenOptions): Promise<number> {
  const io = options.io;
  const stdin = options.stdin ?? process.stdin;
  const stdout = options.stdout ?? process.stdout;
  const stderr = options.stderr ?? process.stderr;
  const env = options.env ?? process.env;
  const fileName = basename(filePath);

  let text: string;
  try {
    text = io.readText(filePath);
  } catch (error) {
    // Not UTF-8: the reader's message already says FILE:LINE:COL.
    const encoding = (error as { code?: string }).code === 'ENCODING';
    stderr.write(encoding ? `${(error as Error).message}\n` : `looprig: cannot read ${filePath}: ${(error as Error).message}\n`);
    return 2;
  }
  const loaded = loadPlant(text, filePath);
  if (loaded.plant === undefined) {
    for (const d of loaded.diagnostics) stderr.write(`${formatDiagnostic(d, text, filePath)}\n`);
    return 2;
  }
  let setup;
  try {
    setup = setupLoop(loaded.plant);
  } catch (error) {
    stderr.write(`${filePath}: cannot set the loop up: ${(error as Error).message}\n`);
    return 2;
  }
  // The live run has no end, so its delay lines hold the whole delay (bounded: false).
  const budget = options.budget ?? { lifted: false, hint: '' };
  const over = plantBudget(loaded.plant, setup.loop, text, filePath, { bounded: false, limits: budget.lifted ? null : DEFAULT_BUDGET });
  if (over.length > 0) {
    for (const r of over) stderr.write(`${r.message}${r.hard || budget.hint === '' ? '' : `; ${budget.hint}`}\n`);
    return 2;
  }
  if (!stdin.isTTY) {
    stderr.write("looprig: the screen needs a terminal for keys; use 'looprig run FILE' in scripts\n");
    return 2;
  }
  const warnings: Notice[] = loaded.diagnostics
    .filter((d) => d.severity === 'warning')
    .map((d) => ({ tone: 'warn', text: formatDiagnostic(d, text, fileName) }));
  const notices = withNotices(options.notices ?? diagnoseSource(loaded.plant), warnings);

  let code = 0;
  let restored = false;
  const restore = (): void => {
    if (restored) return;
    restored = true;
    stdout.write(LEAVE_ALT + SHOW_CURSOR);
  };
  stdout.write(ENTER_ALT);
  const instance = render(
    <App
      setup={setup}
      filePath={filePath}
      fileName={fileName}
      text={text}
      io={io}
      notices={notices}
      color={colorWanted(env, stdout)}
      caution={options.caution ?? true}
      mode={options.mode}
      onExit={(c) => {
        code = c;
      }}
    />,
    { stdin, stdout, stderr, exitOnCtrlC: false, patchConsole: false, maxFps: 60 },
  );
  const onSignal = (signal: NodeJS.Signals): void => {
    code = SIGNAL_EXIT[signal] ?? 1;
    instance.unmount();
  };
  // In raw mode Ctrl-C is a key (the app asks before quitting); a SIGINT from elsewhere ends it.
  const signals: NodeJS.Signals[] = ['SIGTERM', 'SIGHUP', 'SIGINT'];
  for (const s of signals) process.on(s, onSignal);
  // Last resort: whatever ends the process, the terminal comes back.
  process.on('exit', restore);
  try {
    await instance.waitUntilExit();
  } catch (error) {
    restore();
    stderr.write(`looprig: the screen stopped: ${(error as Error).message}\n`);
    code = 1;
  } finally {
    for (const s of signals) process.off(s, onSignal);
    process.off('exit', restore);
    restore();
    // Ink leaves stdin flowing on some terminals; without this the process would not end.
    stdin.pause();
  }
  return code;
}
