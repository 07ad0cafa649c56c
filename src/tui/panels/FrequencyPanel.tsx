/**
 * The frequency view: two lines about the loop (the operating point, the edited gains with the
 * selected one marked, the shaping target, the legend), then the plots that fit (frequency-plots.ts),
 * exactly `height` lines of exactly `width` columns.
 */
import { Box } from 'ink';
import type { CanvasSpan } from '../braille.js';
import type { ShapeTarget } from '../frequency-keys.js';
import { figure, figureLines, frequencyLayout, INFO_LINES, plotLines, type PlotCurves } from '../frequency-plots.js';
import type { FrequencyViewData } from '../frequency-view.js';
import type { GainEdit } from '../gain-edit.js';
import { namedOf, paramInfo, paramList, paramValue } from '../state.js';
import type { Theme } from '../theme.js';
import { showValue } from './GainsPanel.js';
import { headingPieces } from './Heading.js';
import { ellipsizePieces, Line, type Piece } from './line.js';
import { wrap } from './wrap.js';

export interface FrequencyPanelProps {
  data: FrequencyViewData;
  edit: GainEdit;
  /** Index into paramList(edit), as the gain panel marks it. */
  selected: number;
  /** What the set in service is called (null: no such curve is drawn). */
  serviceName: string | null;
  page: number;
  target: ShapeTarget | null;
  width: number;
  height: number;
  theme: Theme;
}

/** The panel's lines as pieces (exported for the layout tests). */
export function frequencyPanelLines(p: FrequencyPanelProps): Piece[][] {
  const t = p.theme;
  const w = p.width;
  const lines: Piece[][] = [];
  const title = p.data.ok && p.data.label !== '' ? `Frequency view · ${p.data.label}` : 'Frequency view';
  lines.push(headingPieces(title, [], w, t));
  const gains: Piece[] = [{ text: `${namedOf(p.edit).toUpperCase()} `, bold: true }];
  const list = paramList(p.edit);
  const sel = Math.min(p.selected, list.length - 1);
  list.forEach((id, i) => {
    const info = paramInfo(id, p.edit.form);
    const text = `${info.symbol} ${showValue(paramValue(p.edit, id))}${info.unit === '' ? '' : ` ${info.unit}`}`;
    gains.push(i === sel ? { text: `>${text}`, bold: true, color: t.sp } : { text: ` ${text}` }, { text: ' ' });
  });
  const layout = p.data.ok ? frequencyLayout(w, p.height, p.page) : null;
  const legend: Piece[] = [{ text: '│ ', color: t.dim }, { text: '── edited ', color: t.pv }];
  if (p.data.ok && p.data.service !== null && p.serviceName !== null) legend.push({ text: `·· ${p.serviceName} `, color: t.baseline });
  if (layout !== null && layout.pages > 1) legend.push({ text: `│ plots ${layout.page + 1}/${layout.pages} Tab`, color: t.dim });
  lines.push(ellipsizePieces([...gains, ...legend], w));
  const figures: Piece[] = [];
  if (p.data.ok) {
    const m = p.data.edited.margins;
    const unstable = m.closedLoopStable === false ? 'closed loop UNSTABLE  ' : '';
    figures.push(
      { text: unstable, color: t.bad, bold: true },
      { text: `ωc ${figure(m.crossoverFrequency)} rad/s  PM ${figure(m.phaseMarginDeg)}°  GM ${figure(m.gainMargin)}  Ms ${figure(m.maxSensitivity)}  Mt ${figure(m.maxComplementarySensitivity)} `, bold: true },
    );
  }
  figures.push({ text: p.target === null ? '│ ←→ ↑↓ shape' : `│ target ωc ${figure(p.target.crossover)} PM ${figure(p.target.phaseMarginDeg)}°`, color: t.sp });
  lines.push(ellipsizePieces(figures, w));
  if (!p.data.ok) {
    for (const l of wrap(p.data.problem, w)) lines.push([{ text: l, color: t.warn }]);
  } else if (layout === null) {
    const curves: PlotCurves = { edited: p.data.edited, service: p.data.service };
    for (const l of figureLines(curves)) lines.push(ellipsizePieces([{ text: l }], w));
  } else {
    const curves: PlotCurves = { edited: p.data.edited, service: p.data.service };
    const slots = layout.kinds.map((k) => plotLines(k, curves, layout.slotWidth, layout.plotRows));
    const colors = colorsOf(t);
    for (let r = 0; r < layout.stacked; r++) {
      for (let j = 0; j < layout.plotRows + 2; j++) {
        const row: Piece[] = [];
        for (let c = 0; c < layout.cols; c++) {
          const slot = slots[c * layout.stacked + r];
          if (c > 0) row.push({ text: ' ' });
          const spans: CanvasSpan[] = slot?.[j] ?? [{ text: ' '.repeat(layout.slotWidth), tag: '' }];
          for (const s of spans) row.push({ text: s.text, color: colors[s.tag], bold: s.tag === 'heading' });
        }
        lines.push(row);
      }
    }
  }
  while (lines.length < p.height) lines.push([]);
  return lines.slice(0, Math.max(INFO_LINES, p.height));
}

function colorsOf(t: Theme): Readonly<Record<string, string | undefined>> {
  return { edited: t.pv, edited2: t.output, service: t.baseline, mark: t.sp, guide: t.dim, circle: t.limit, axis: t.dim, heading: t.heading };
}

export function FrequencyPanel(p: FrequencyPanelProps) {
  return (
    <Box flexDirection="column" width={p.width}>
      {frequencyPanelLines(p).map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}
