/**
 * Panel sizes from the terminal size. Pure arithmetic so every size can be tested without a
 * terminal; the app recomputes it on every resize.
 *
 * The screen uses rows - 1 lines: a frame as tall as the terminal makes Ink clear the whole
 * screen on every redraw (visible flicker over SSH).
 */

export type Tier = 'tiny' | 'small' | 'large';

export interface Layout {
  tier: Tier;
  /** Columns every line is cut to. */
  width: number;
  /** Lines the whole frame uses. */
  lines: number;
  /** Plot rows of the trend chart (0 = no trend). */
  trendRows: number;
  /** Plot rows of the controller-output chart (0 = not shown). */
  outputRows: number;
  /** The trend draws its own time axis; false when the output chart right below shares its axis. */
  trendAxis: boolean;
  /** The margins (GM, PM, Ms) take the last line of the metrics column (no notices column). */
  marginsInMetrics: boolean;
  /** Body lines of the gain / metrics row (below its heading). */
  bottomRows: number;
  gainsWidth: number;
  metricsWidth: number;
  /** Width of the notices column beside the metrics (0 = notices only on the message line). */
  noticesWidth: number;
}

/** Smallest terminal with a trend chart. */
export const MIN_TREND = { columns: 60, rows: 14 } as const;
/** Plot rows of the output chart below the large size: enough to see the valve against its limits. */
export const SMALL_OUTPUT_ROWS = 3;
/** Body lines of the bottom row below the large size: metrics header, five verdicts, the margins line. */
const SMALL_BOTTOM_ROWS = 7;
/** From this size on: notices column, taller output chart. */
export const LARGE = { columns: 100, rows: 32 } as const;

/**
 * Lay out the screen.
 * @param columns terminal width
 * @param rows terminal height
 * @param gainLines lines the gain panel needs (parameters + its form line)
 */
export function computeLayout(columns: number, rows: number, gainLines: number): Layout {
  const width = Math.max(20, Math.floor(columns || 80));
  const lines = Math.max(6, Math.floor(rows || 24) - 1);
  // Fixed lines: status, message/notice, hint.
  const fixed = 3;
  if (width < MIN_TREND.columns || lines + 1 < MIN_TREND.rows) {
    const bottomRows = Math.max(1, lines - fixed - 1);
    return { tier: 'tiny', width, lines, trendRows: 0, outputRows: 0, trendAxis: false, marginsInMetrics: false, bottomRows, gainsWidth: width, metricsWidth: 0, noticesWidth: 0 };
  }
  const wanted = Math.max(gainLines, 6);
  const large = width >= LARGE.columns && lines + 1 >= LARGE.rows;
  // Each chart costs a heading and a time axis besides its plot rows; the bottom row a heading.
  if (!large) {
    const gainsWidth = Math.min(38, Math.floor(width * 0.45));
    const cols = { gainsWidth, metricsWidth: width - gainsWidth - 1, noticesWidth: 0 };
    // Over SSH the valve is what one watches while retuning: the output chart comes before trend
    // rows, sharing the trend's time axis (one heading more, one axis less).
    const withOutput = lines - fixed - 1 - 3 - SMALL_OUTPUT_ROWS;
    if (withOutput >= 3 + 4) {
      const bottomRows = Math.min(Math.max(wanted, SMALL_BOTTOM_ROWS), withOutput - 3);
      const trendRows = withOutput - bottomRows;
      return { tier: 'small', width, lines, trendRows, outputRows: SMALL_OUTPUT_ROWS, trendAxis: false, marginsInMetrics: true, bottomRows, ...cols };
    }
    const avail = lines - fixed - 1 - 2;
    // The trend keeps at least 3 rows; the gain panel scrolls when it gets fewer than it needs.
    const bottomRows = Math.min(wanted, avail - 3);
    const trendRows = avail - bottomRows;
    return { tier: 'small', width, lines, trendRows, outputRows: 0, trendAxis: true, marginsInMetrics: true, bottomRows, ...cols };
  }
  const bottomRows = wanted;
  const free = lines - fixed - 1 - bottomRows;
  const charts = free - 4;
  const outputRows = Math.max(4, Math.floor(charts * 0.3));
  const trendRows = charts - outputRows;
  const gainsWidth = 38;
  const noticesWidth = Math.max(24, Math.floor((width - gainsWidth) * 0.4));
  const metricsWidth = width - gainsWidth - noticesWidth - 2;
  return { tier: 'large', width, lines, trendRows, outputRows, trendAxis: true, marginsInMetrics: false, bottomRows, gainsWidth, metricsWidth, noticesWidth };
}
