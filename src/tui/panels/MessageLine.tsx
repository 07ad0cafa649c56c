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
import { markText } from './NoticesPanel.js';
import { wrap } from './wrap.js';

/** Most lines a message may take; beyond that its last line ends in '…'. */
const MESSAGE_MAX_LINES = 4;

/** The message (or question) as word-wrapped lines of `width`; one line when there is none. */
/** Most lines the first notice takes on the message line (a line more than the trend can spare would hide it). */
const NOTICE_MAX_LINES = 2;

/** A notice as one text: its marker, title and words. */
export function noticeText(n: Notice): string {
  const mark = markText(n);
  return n.title === undefined ? `${mark}${n.text}` : `${mark}${n.title}: ${n.text}`;
}

/**
 * The message (or question) as word-wrapped lines of `width`; without one, the first notice
 * (`notice`, when the notices have no column of their own); one empty line when there is neither.
 */
export function messageLines(state: ScreenState, width: number, notice: Notice | null = null): string[] {
  const o = state.overlay;
  const text = o.kind === 'confirm' ? `${o.text} (y/n)` : o.kind !== 'input' && state.message !== null ? state.message.text : '';
  const showNotice = text === '' && o.kind !== 'input' && notice !== null;
  const lines = wrap(showNotice ? noticeText(notice) : text, width);
  const most = showNotice ? NOTICE_MAX_LINES : MESSAGE_MAX_LINES;
  if (lines.length === 0) return [''];
  if (lines.length <= most) return lines;
  const kept = lines.slice(0, most);
  // The last line kept ends at a word, with '…' saying there is more.
  kept[most - 1] = ellipsizePieces([{ text: `${kept[most - 1]} ${lines[most]}` }], width)[0].text;
  return kept;
}

export function MessageLine(p: {
  state: ScreenState;
  /** `messageLines` of the state at this width (the layout gave them their rows). */
  lines: readonly string[];
  width: number;
  theme: Theme;
  /** The notice on the message line when there is no message (null: none, or they have a column). */
  notice: Notice | null;
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
  const n = p.notice;
  if (n === null) return <Line pieces={[]} width={width} color={theme.color} />;
  const color = n.tone === 'bad' ? theme.bad : n.tone === 'warn' ? theme.warn : undefined;
  return (
    <Box flexDirection="column" width={width}>
      {lines.map((text, i) => (
        <Line key={i} pieces={[{ text, color, bold: i === 0 && n.tone !== 'info' }]} width={width} color={theme.color} />
      ))}
    </Box>
  );
}
