/**
 * A private tmux server for end-to-end screen tests: its own socket, so tests never touch a
 * person's sessions, and a `kill` that also removes the socket file tmux leaves behind.
 */
import { spawnSync } from 'node:child_process';
import { rmSync } from 'node:fs';

/** True when tmux can be run here (the end-to-end tests skip, with a message, without it). */
export const HAS_TMUX = spawnSync('tmux', ['-V'], { encoding: 'utf8' }).status === 0;

export interface TmuxServer {
  /** Run a tmux command on this server; its stdout (throws with tmux's stderr on failure). */
  run(...args: string[]): string;
  /** The visible text of a session's pane. */
  pane(session: string): string;
  /** End the server and remove its socket file. */
  kill(): void;
}

export function tmuxServer(prefix: string): TmuxServer {
  const socket = `${prefix}-${process.pid}-${Math.random().toString(36).slice(2, 8)}`;
  const run = (...args: string[]): string => {
    const r = spawnSync('tmux', ['-L', socket, ...args], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`tmux ${args.join(' ')}: ${r.stderr}`);
    return r.stdout;
  };
  return {
    run,
    pane: (session) => run('capture-pane', '-p', '-t', session),
    kill: () => {
      const path = spawnSync('tmux', ['-L', socket, 'display-message', '-p', '#{socket_path}'], { encoding: 'utf8' }).stdout.trim();
      spawnSync('tmux', ['-L', socket, 'kill-server']);
      if (path !== '') rmSync(path, { force: true });
    },
  };
}
