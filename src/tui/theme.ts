/**
 * Colours and markers. With colour off (NO_COLOR, FORCE_COLOR=0, a pipe, a 1-bit terminal,
 * TERM=dumb) nothing is styled at all and every distinction is made by characters instead:
 * '>' marks the selection, [ok]/[NO] the requirement checks, and each chart series has its own
 * line glyphs.
 */

export interface Theme {
  readonly color: boolean;
  /** Ink colour name per role, or undefined when colour is off. */
  readonly pv: string | undefined;
  readonly sp: string | undefined;
  readonly baseline: string | undefined;
  readonly output: string | undefined;
  readonly limit: string | undefined;
  /** The robustness envelope on the trend. */
  readonly envelope: string | undefined;
  readonly ok: string | undefined;
  readonly bad: string | undefined;
  readonly warn: string | undefined;
  readonly dim: string | undefined;
  readonly heading: string | undefined;
}

const PALETTE = {
  pv: 'cyanBright',
  sp: 'yellow',
  baseline: 'magenta',
  output: 'greenBright',
  limit: 'red',
  envelope: 'blue',
  ok: 'green',
  bad: 'redBright',
  warn: 'yellow',
  dim: 'gray',
  heading: 'blueBright',
} as const;

export function makeTheme(color: boolean): Theme {
  if (color) return { color, ...PALETTE };
  return {
    color,
    pv: undefined,
    sp: undefined,
    baseline: undefined,
    output: undefined,
    limit: undefined,
    envelope: undefined,
    ok: undefined,
    bad: undefined,
    warn: undefined,
    dim: undefined,
    heading: undefined,
  };
}

/** What `colorWanted` reads from the stream. */
export interface ColorStream {
  isTTY?: boolean;
  getColorDepth?: () => number;
}

/**
 * Decide whether to colour. NO_COLOR (any non-empty value, no-color.org) and FORCE_COLOR=0 turn
 * colour off; FORCE_COLOR=1..3 turns it on; otherwise colour needs a TTY of more than 1 bit.
 */
export function colorWanted(env: Readonly<Record<string, string | undefined>>, stream: ColorStream): boolean {
  if (env.NO_COLOR !== undefined && env.NO_COLOR !== '') return false;
  const force = env.FORCE_COLOR;
  if (force !== undefined) {
    if (force === '0' || force === 'false') return false;
    return true;
  }
  if (env.TERM === 'dumb') return false;
  if (!stream.isTTY) return false;
  const depth = typeof stream.getColorDepth === 'function' ? stream.getColorDepth() : 8;
  return depth > 1;
}

/** Line glyphs per chart series (asciichart's symbol order), used with and without colour. */
export const GLYPHS = {
  // The process value keeps asciichart's box-drawing lines.
  pv: ['┼', '┤', '╶', '╴', '─', '╰', '╭', '╮', '╯', '│'],
  sp: ['┼', '┤', '╶', '╴', '╌', '╎', '╎', '╎', '╎', '╎'],
  baseline: ['┼', '┤', '╶', '╴', '·', '·', '·', '·', '·', '·'],
  output: ['┼', '┤', '╶', '╴', '─', '╰', '╭', '╮', '╯', '│'],
  limit: ['┼', '┤', '╶', '╴', '=', ' ', ' ', ' ', ' ', ' '],
  // The envelope's edges as shaded cells, no verticals: a band, not a line.
  envelope: ['┼', '┤', '╶', '╴', '░', ' ', ' ', ' ', ' ', ' '],
} as const;
