/**
 * The line over the hint: a typed value's prompt, a question, a message (word-wrapped, up to four
 * lines), or else the first notice.
 */
import { Box, Text } from 'ink';
import TextInput from 'ink-text-input';
import { paramList } from '../gain-edit.js';
import type { Notice } from '../notices.js';
import { paramInfo } from '../param-meta.js';
import type { Action, ScreenState } from '../screen-state.js';
import type { Theme } from '../theme.js';
import { ellipsizePieces, fit, Line } from './line.js';
import { noticePieces } from './NoticesPanel.js';
import { wrap } from './wrap.js';

/** Most lines a message may take; beyond that its last line ends in '…'. */
const MESSAGE_MAX_LINES = 4;

/** The message (or question) as word-wrapped lines of `width`; one line when there is none. */
export function messageLines(state: ScreenState, width: number): string[] {
  const o = state.overlay;
  const text = o.kind === 'confirm' ? `${o.text} (y/n)` : o.kind !== 'input' && state.message !== null ? state.message.text : '';
  const lines = wrap(text, width);
  if (lines.length === 0) return [''];
  if (lines.length <= MESSAGE_MAX_LINES) return lines;
  const kept = lines.slice(0, MESSAGE_MAX_LINES);
  kept[MESSAGE_MAX_LINES - 1] = `${kept[MESSAGE_MAX_LINES - 1].slice(0, width - 1)}…`;
  return kept;
}

export function MessageLine(p: {
  state: ScreenState;
  /** `messageLines` of the state at this width (the layout gave them their rows). */
  lines: readonly string[];
  width: number;
  theme: Theme;
  notices: readonly Notice[];
  dispatch: (a: Action) => void;
}) {
  const { state, theme, width } = p;
  const o = state.overlay;
  if (o.kind === 'input') {
    const what =
      o.target === 'switch_time'
        ? 'switch at'
        : paramInfo(paramList(state.current)[Math.min(state.selected, paramList(state.current).length - 1)], state.current.form).symbol + ' =';
    const tail = o.error !== null ? `  ${o.error}` : '  Enter accept, Esc cancel';
    const shownLength = o.text.length > 0 ? o.text.length : o.placeholder.length;
    return (
      <Box width={width} height={1} overflow="hidden">
        <Text color={theme.heading} bold>
          {what}{' '}
        </Text>
        <TextInput
          value={o.text}
          placeholder={o.placeholder}
          onChange={(text) => p.dispatch({ type: 'input_change', text })}
          onSubmit={() => p.dispatch({ type: 'input_submit' })}
        />
        <Text color={o.error !== null ? theme.bad : theme.dim} wrap="truncate">
          {fit(tail, Math.max(0, width - what.length - 2 - shownLength))}
        </Text>
      </Box>
    );
  }
  const lines = p.lines;
  if (o.kind === 'confirm' || state.message !== null) {
    const tone = o.kind === 'confirm' ? 'warn' : state.message?.tone;
    const color = tone === 'error' ? theme.bad : tone === 'warn' ? theme.warn : undefined;
    return (
      <Box flexDirection="column" width={width}>
        {lines.map((text, i) => (
          <Line key={i} pieces={[{ text, color, bold: o.kind === 'confirm' }]} width={width} color={theme.color} />
        ))}
      </Box>
    );
  }
  const first = p.notices[0];
  if (first !== undefined) return <Line pieces={ellipsizePieces(noticePieces(first, theme), width)} width={width} color={theme.color} />;
  return <Line pieces={[]} width={width} color={theme.color} />;
}
