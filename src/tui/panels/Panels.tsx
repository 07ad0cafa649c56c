/**
 * The main screen's panels: the trend, the controller output, and under them the gain set, the
 * trial against the requirements and the notices, as many as the layout gives room for.
 */
import { Box, Text } from 'ink';
import { quantityLabel, withUnit, type PlantUnits } from '../../model/index.js';
import type { Requirements } from '../../model/types.js';
import { LABEL_WIDTH, pointsForWidth, renderChart, type ChartGrid } from '../chart.js';
import type { Evaluation } from '../engine.js';
import type { EnvelopeState } from '../hooks/use-envelope.js';
import { MIN_TREND, type Layout } from '../layout.js';
import type { LiveRun } from '../live-run.js';
import type { MetricRow } from '../metric-rows.js';
import type { MarginsView, Notice } from '../notices.js';
import type { ScreenState } from '../screen-state.js';
import { GLYPHS, type Theme } from '../theme.js';
import { outputSeries, SPREAD_GLYPH, trendSeries } from '../trend-series.js';
import { hasStripRequirements, stripSteps, VERDICT_MARKS, verdictStrip, type Strip, type StripStep } from '../verdict-strip.js';
import { ChartPanel } from './ChartPanel.js';
import { GainsPanel } from './GainsPanel.js';
import type { LegendPiece } from './Heading.js';
import { Line, type Piece } from './line.js';
import { MetricsPanel } from './MetricsPanel.js';
import { NoticesPanel } from './NoticesPanel.js';
import { wrap } from './wrap.js';

export interface PanelsProps {
  /** The terminal's size (the too-small notice says it). */
  terminal: { columns: number; rows: number };
  layout: Layout;
  theme: Theme;
  state: ScreenState;
  now: Evaluation;
  base: Evaluation | null;
  run: LiveRun | null;
  req: Requirements;
  metricRowsNow: readonly MetricRow[];
  nowLabel: string;
  notices: Notice[];
  margins: MarginsView | null | 'pending';
  actuator: { min: number; max: number };
  /** The file's units: on the charts' titles (their value axes) and the envelope's spread. */
  units: PlantUnits;
  /** The robustness envelope (null: not wanted, or not drawn in this mode). */
  envelope: EnvelopeState | null;
  /** Why the envelope asked for is not drawn (null: drawn, or not asked for). */
  envelopeNote: string | null;
}

export function Panels(p: PanelsProps) {
  const { layout, theme, state } = p;
  const w = layout.width;
  const colors: Record<string, string | undefined> = {
    pv: theme.pv,
    sp: theme.sp,
    baseline: theme.baseline,
    output: theme.output,
    limit: theme.limit,
    envelope: theme.envelope,
  };
  const points = pointsForWidth(w);
  let trace = p.now.result.trace;
  let t0 = 0;
  let t1 = state.trialDuration;
  let steps: StripStep[] = stripSteps(p.now.metrics);
  let baselineTrace = p.base?.result.trace ?? null;
  if (p.run !== null) {
    trace = p.run.trace();
    // Scroll over the last `window` seconds; before that, zoom out as the run grows so an
    // early response is not squeezed into the left edge.
    t0 = Math.max(0, p.run.time - p.run.window);
    t1 = Math.max(p.run.time, t0 + p.run.window / 6);
    steps = p.run.stripSteps();
    baselineTrace = null;
  }
  // Legend entries in the order shown; on a narrow heading the highest `drop` goes first.
  const legend: LegendPiece[] = [
    { text: '╌ SP ', color: theme.sp, drop: 3 },
    { text: '─ PV ', color: theme.pv, drop: 4 },
  ];
  if (baselineTrace !== null) legend.push({ text: p.state.rehearse ? '· in service only ' : '· in service ', short: '· in svc ', color: theme.baseline, drop: 2 });
  const env = p.run === null ? p.envelope : null;
  if (env !== null) legend.push({ text: envelopeLegend(env, p.units.output), color: theme.envelope, drop: 1 });
  else if (p.envelopeNote !== null) legend.push({ text: `░ envelope: ${p.envelopeNote} `, short: '░ no envelope ', color: theme.dim, drop: 1 });
  const title = quantityLabel(p.run !== null ? 'Live trend' : p.state.rehearse ? 'Rehearsal trend' : 'Trial trend', p.units.output);
  const marks = p.run === null && p.state.rehearse ? [{ at: p.state.switchAt, ch: '▲' }] : [];
  if (marks.length > 0) legend.push({ text: '▲ switch ', color: theme.baseline, drop: 6 });

  const showTrend = layout.trendRows > 0;
  // One trend row becomes the verdict strip when the file sets a requirement it can mark.
  const withStrip = showTrend && layout.trendRows >= 4 && hasStripRequirements(p.req);
  const trendGrid = showTrend
    ? renderChart(
        trendSeries({
          trace,
          baseline: baselineTrace,
          t0,
          t1,
          points,
          envelope: env?.envelope ? { t: env.envelope.t, lo: env.envelope.lo, hi: env.envelope.hi, length: env.envelope.t.length } : null,
        }),
        { width: w, height: layout.trendRows - (withStrip ? 1 : 0), labelWidth: LABEL_WIDTH },
      )
    : null;
  // PV is one line (each column's middle); where its samples spread over more than a row, the legend says what fills the column.
  if (trendGrid?.spread.has('pv') === true) legend.splice(2, 0, { text: `${SPREAD_GLYPH} PV range `, short: `${SPREAD_GLYPH} range `, color: theme.pv, drop: 5 });
  let strip: Piece[] | undefined;
  if (withStrip && trendGrid !== null) {
    const run = p.run;
    const result = p.now.result;
    const marked = verdictStrip({
      trace,
      steps,
      req: p.req,
      overall: run === null ? p.now.metrics.overall : null,
      divergedAt: run === null ? (result.status === 'diverged' ? result.divergedAt : null) : run.diverged ? run.divergedAt : null,
      t0,
      t1,
      columns: trendGrid.columns,
    });
    strip = stripPieces(marked, trendGrid.gutter, theme);
    legend.push(...stripLegend(marked, theme));
  }
  const outSeries = outputSeries(trace, baselineTrace, t0, t1, points, p.actuator);
  const outputGrid =
    layout.outputRows > 0
      ? renderChart(outSeries, {
          width: w,
          height: layout.outputRows,
          labelWidth: LABEL_WIDTH,
        })
      : null;

  const gainsW = layout.gainsWidth;
  const gains = (width: number) => (
    <GainsPanel edit={state.current} baseline={state.baseline?.edit ?? null} selected={state.selected} width={width} rows={layout.bottomRows} theme={theme} />
  );
  const bottom = (
    <Box flexDirection="column" width={w}>
      <Line pieces={bottomHeading(layout, theme)} width={w} color={theme.color} />
      <Box flexDirection="row" width={w}>
        {gains(gainsW)}
        {layout.metricsWidth > 0 && <Separator rows={layout.bottomRows} theme={theme} />}
        {layout.metricsWidth > 0 && (
          <MetricsPanel
            rows={p.metricRowsNow}
            nowLabel={p.nowLabel}
            width={layout.metricsWidth}
            height={layout.bottomRows}
            theme={theme}
            note={layout.marginsInMetrics ? marginsLine(p.margins, theme, layout.metricsWidth, p.units.output) : null}
          />
        )}
        {layout.noticesWidth > 0 && <Separator rows={layout.bottomRows} theme={theme} />}
        {layout.noticesWidth > 0 && (
          <NoticesPanel notices={p.notices} margins={marginsLine(p.margins, theme, layout.noticesWidth, p.units.output)} width={layout.noticesWidth} height={layout.bottomRows} theme={theme} />
        )}
      </Box>
    </Box>
  );

  if (layout.tier === 'tiny') {
    // Said in full (wrapped), with the size it has and the size the charts need.
    const warn = wrap(`Terminal too small (${p.terminal.columns}x${p.terminal.rows}): the charts need ${MIN_TREND.columns}x${MIN_TREND.rows}. Gain set:`, w);
    return (
      <Box flexDirection="column" width={w}>
        {warn.map((text, i) => (
          <Line key={i} pieces={[{ text, color: theme.warn, bold: true }]} width={w} color={theme.color} />
        ))}
        <GainsPanel edit={state.current} baseline={state.baseline?.edit ?? null} selected={state.selected} width={w} rows={Math.max(1, layout.bottomRows - warn.length + 1)} theme={theme} />
      </Box>
    );
  }
  return (
    <Box flexDirection="column" width={w}>
      {trendGrid !== null && (
        <ChartPanel title={title} legend={legend} grid={trendGrid} strip={strip} t0={t0} t1={t1} width={w} theme={theme} colors={colors} marks={marks} axis={layout.trendAxis} />
      )}
      {outputGrid !== null && (
        <ChartPanel
          title={quantityLabel('Controller output', p.units.actuator)}
          legend={outputLegend(outputGrid, outSeries.some((x) => x.tag === 'sp'), baselineTrace !== null, theme)}
          grid={outputGrid}
          marks={marks}
          t0={t0}
          t1={t1}
          width={w}
          theme={theme}
          colors={colors}
        />
      )}
      {bottom}
    </Box>
  );
}

/**
 * The output chart's legend. With a sticky valve the line is the stem and the dashed one the
 * command; where a column's samples span more than a row it is filled, each line with its own glyph.
 */
function outputLegend(grid: ChartGrid, command: boolean, baseline: boolean, theme: Theme): LegendPiece[] {
  const legend: LegendPiece[] = [{ text: command ? '─ stem ' : '─ u ', color: theme.output }];
  if (command) legend.push({ text: `${GLYPHS.sp[4]} command `, color: theme.sp });
  if (grid.spread.has('output')) legend.push({ text: `${SPREAD_GLYPH} ${command ? 'stem' : 'u'} range `, short: `${SPREAD_GLYPH} range `, color: theme.output, drop: 2 });
  if (grid.spread.has('sp')) legend.push({ text: `${GLYPHS.sp[9]} command range `, short: `${GLYPHS.sp[9]} range `, color: theme.sp, drop: 3 });
  if (baseline) legend.push({ text: '· in service ', color: theme.baseline, drop: 1 });
  legend.push({ text: '= limits ', color: theme.limit });
  return legend;
}

/** The verdict strip as one chart row: its label in the gutter, '·' where nothing is broken, the letter where a requirement is. */
function stripPieces(strip: Strip, gutter: number, theme: Theme): Piece[] {
  const pieces: Piece[] = [{ text: 'verdict'.padStart(gutter - 1) + '┤', color: theme.dim }];
  let run: Piece | null = null;
  for (const k of strip.cells) {
    const text = k === null ? '·' : VERDICT_MARKS[k].letter;
    const color = k === null ? theme.dim : theme.bad;
    if (run !== null && run.color === color && (k === null) === (run.text[0] === '·')) run.text += text;
    else {
      run = { text, color, bold: k !== null };
      pieces.push(run);
    }
  }
  return pieces;
}

/** The strip's legend: the letters it shows with their words, or that every limit holds. */
function stripLegend(strip: Strip, theme: Theme): LegendPiece[] {
  if (strip.broken.length === 0) return [{ text: '· requirements met ', short: '· met ', color: theme.ok }];
  return [
    {
      text: `broken: ${strip.broken.map((k) => `${VERDICT_MARKS[k].letter} ${VERDICT_MARKS[k].word}`).join(' ')} `,
      short: `✗ ${strip.broken.map((k) => VERDICT_MARKS[k].letter).join(' ')} `,
      color: theme.bad,
    },
  ];
}

/** The envelope's legend entry: its cases, or how far its sweep has come. */
function envelopeLegend(e: EnvelopeState, unit: string | null): string {
  if (e.error !== null) return `░ envelope failed: ${e.error} `;
  if (e.total === 0) return '░ envelope … ';
  const cases = e.done < e.total ? `${e.done}/${e.total} cases…` : `${e.total} cases`;
  // The widest spread, so that an envelope hidden under the PV line still says how wide it is.
  let spread = 0;
  const env = e.envelope;
  if (env !== null) for (let i = 0; i < env.t.length; i++) if (Number.isFinite(env.hi[i] - env.lo[i])) spread = Math.max(spread, env.hi[i] - env.lo[i]);
  return `░ envelope ${cases}, spread ≤ ${withUnit(String(Number(spread.toPrecision(2))), unit)}${e.anyDiverged ? ', one diverges' : ''} `;
}

/** The margins of the edited gains as one notices line, or null without a diagnosis. */
function marginsLine(m: MarginsView | null | 'pending', theme: Theme, width: number, unit: string | null = null): Piece[] | null {
  if (m === null) return null;
  if (m === 'pending') return [{ text: 'margins …', color: theme.dim }];
  if (m.closedLoopStable === false) return [{ text: 'closed loop UNSTABLE', color: theme.bad, bold: true }];
  const f = (v: number, unit = ''): string => (Number.isFinite(v) ? `${Number(v.toPrecision(3))}${unit}` : v > 0 ? '∞' : '—');
  const parts = [`GM ${f(m.gainMargin)}`, `PM ${f(m.phaseMarginDeg, '°')}`, `Ms ${f(m.maxSensitivity)}`];
  // Where they were read (the worst operating point), whole or not at all.
  const at = m.level !== undefined ? `@ level ${Number(m.level.toPrecision(4))}${unit ? ` ${unit}` : ''}` : m.points !== undefined ? `worst of ${m.points} points` : '';
  // Two spaces between the parts where they fit, one where not, the place dropped last: never a cut figure.
  for (const gap of ['  ', ' ']) {
    const text = parts.join(gap);
    if (at !== '' && text.length + gap.length + at.length <= width) return [{ text, bold: true }, { text: `${gap}${at}`, color: theme.dim }];
  }
  const text = parts.join('  ').length <= width ? parts.join('  ') : parts.join(' ');
  return [{ text, bold: true }];
}

/** One rule over the gain, metrics and notices columns, with a title over each. */
function bottomHeading(layout: Layout, theme: Theme): Piece[] {
  const col = (title: string, width: number): Piece[] => [
    { text: '─ ', color: theme.dim },
    { text: title, color: theme.heading, bold: true },
    { text: ' ' + '─'.repeat(Math.max(0, width - title.length - 3)), color: theme.dim },
  ];
  const pieces = col('Gain set', layout.gainsWidth);
  if (layout.metricsWidth > 0) pieces.push({ text: '┼', color: theme.dim }, ...col('Trial vs requirements', layout.metricsWidth));
  if (layout.noticesWidth > 0) pieces.push({ text: '┼', color: theme.dim }, ...col('Notices', layout.noticesWidth));
  return pieces;
}

function Separator(p: { rows: number; theme: Theme }) {
  return (
    <Box flexDirection="column" width={1}>
      {Array.from({ length: p.rows }, (_, i) => (
        <Text key={i} color={p.theme.dim}>
          │
        </Text>
      ))}
    </Box>
  );
}

