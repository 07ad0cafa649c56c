/**
 * The terminal screen. Keys become reducer actions (keymap.ts -> state.ts); the core answers
 * every question about the loop (engine.ts, live-run.ts); this component only wires the two
 * together and draws the panels that fit the terminal (layout.ts).
 */
import { Box, Text, useApp, useInput, useStdout } from 'ink';
import TextInput from 'ink-text-input';
import { useEffect, useMemo, useReducer, useRef, useState } from 'react';
import { gainNote, loadPlant } from '../model/index.js';
import { defaultSwitchTime, switchBump, switchWindowEnd } from '../tune/index.js';
import type { PidForm, Requirements } from '../model/types.js';
import { LABEL_WIDTH, pointsForWidth, renderChart } from './chart.js';
import { CORE_EDIT_MATH } from './edit-math.js';
import {
  evaluate,
  fileEdit,
  fileGainSwitches,
  rehearsalTrial,
  runningGains,
  structureMarginsView,
  type Evaluation,
  type LoopSetup,
} from './engine.js';
import { useEnvelope, type EnvelopeState } from './hooks/use-envelope.js';
import { useTuningAids } from './hooks/use-tuning-aids.js';
import { HINT, LIST_HINT, keyTokens } from './keymap.js';
import { computeLayout, type Layout } from './layout.js';
import { LiveRun } from './live-run.js';
import { metricRows, type MetricInput } from './metric-rows.js';
import type { MarginsView, Notice, NoticeSource } from './notices.js';
import { CautionOverlay } from './panels/CautionOverlay.js';
import { ChartPanel } from './panels/ChartPanel.js';
import { CompareOverlay } from './panels/CompareOverlay.js';
import { GainsPanel, gainPanelLines } from './panels/GainsPanel.js';
import { Heading } from './panels/Heading.js';
import { HelpOverlay } from './panels/HelpOverlay.js';
import { ellipsizePieces, Line, fit, type Piece } from './panels/line.js';
import { MetricsPanel } from './panels/MetricsPanel.js';
import { NoticesPanel, noticePieces } from './panels/NoticesPanel.js';
import { noiseNotice } from './noise-notice.js';
import { OptimizePanel } from './panels/OptimizePanel.js';
import { StatusLine } from './panels/StatusLine.js';
import { SuggestPanel } from './panels/SuggestPanel.js';
import { wrap } from './panels/wrap.js';
import { planSave } from './save-gains.js';
import {
  frameId,
  initialState,
  isDirty,
  namedOf,
  paramInfo,
  paramList,
  reduce,
  speedOf,
  type Action,
  type Effect,
  type GainEdit,
  type Overlay,
  type RunMode,
  type ScreenState,
} from './state.js';
import { makeTheme, type Theme } from './theme.js';
import { bandLines, outputSeries, trendSeries, type BandStep } from './trend-series.js';

/** File access the screen needs; tests pass a fake, the command passes the real files. */
export interface ScreenIo {
  /** Read the file; an error with `code` 'ENOENT' means it is gone (a save writes it anew). */
  readText(path: string): string;
  /**
   * Write the file keeping its link, mode and owner (the CLI's writer). Returns sentences about
   * anything unusual (a link followed, a non-atomic write, the file recreated); fakes may not.
   */
  writeText(path: string, text: string, options?: { expectExisting?: boolean }): { notes: readonly string[] } | void;
}

export interface AppProps {
  setup: LoopSetup;
  /** Path used for reading and writing the file. */
  filePath: string;
  /** Name shown on screen. */
  fileName: string;
  /** The file text as loaded. */
  text: string;
  io: ScreenIo;
  notices: NoticeSource;
  color: boolean;
  /** Show the safety caution first. */
  caution: boolean;
  mode?: RunMode;
  /** Fixed terminal size (tests); absent = the real terminal's, following resizes. */
  size?: { columns: number; rows: number };
  /** Live-run timer period, ms. */
  tickMs?: number;
  /** Called once with the exit code when the user quits. */
  onExit(code: number): void;
  /** Called after each frame whose state changed (benchmarks). */
  onFrame?(): void;
}

/** Wall-time budget of one live tick, ms: the rest of the tick is left to keys and drawing. */
const LIVE_BUDGET_MS = 25;

const reducer = (s: ScreenState, a: Action): ScreenState => reduce(s, a, CORE_EDIT_MATH);

function useTerminalSize(fixed: AppProps['size']): { columns: number; rows: number } {
  const { stdout } = useStdout();
  const read = (): { columns: number; rows: number } => ({ columns: stdout.columns || 80, rows: stdout.rows || 24 });
  const [size, setSize] = useState(read);
  useEffect(() => {
    if (fixed !== undefined) return undefined;
    const onResize = (): void => setSize(read());
    stdout.on('resize', onResize);
    return () => {
      stdout.off('resize', onResize);
    };
  }, [stdout, fixed]);
  return fixed ?? size;
}

export function App(props: AppProps) {
  const { setup } = props;
  const plant = setup.plant;
  const trial = plant.loop.trial;
  const req = plant.loop.requirements;
  const theme = useMemo(() => makeTheme(props.color), [props.color]);
  const fileForm: PidForm = plant.loop.controller.form;
  const { exit } = useApp();

  const [state, dispatch] = useReducer(reducer, undefined, () =>
    initialState({
      fileName: props.fileName,
      file: fileEdit(setup),
      trialDuration: trial.duration,
      switchAt: defaultSwitchTime(trial),
      caution: props.caution,
      mode: props.mode,
      uncertainty: Object.keys(plant.uncertainty).length > 0,
    }),
  );
  const size = useTerminalSize(props.size);
  // A long message (a save error naming a path) is wrapped, not cut: the charts give up the rows.
  const messageRows = messageLines(state, Math.max(20, Math.floor(size.columns || 80))).length;
  const layout = computeLayout(size.columns, size.rows - (messageRows - 1), gainPanelLines(state.current));
  const aids = useTuningAids(setup, dispatch);

  // ---------------------------------------------------------------- instant evaluation
  const baselineEdit = state.baseline?.edit ?? null;
  const rehearsing = state.rehearse && baselineEdit !== null;
  const now: Evaluation = useMemo(() => {
    if (rehearsing) return evaluate(setup, baselineEdit, rehearsalTrial(trial, state.current, state.switchAt));
    return evaluate(setup, state.current);
  }, [setup, state.current.gains, state.current.structure, frameId(state.current), rehearsing, baselineEdit, state.switchAt]);
  const base: Evaluation | null = useMemo(
    () => (baselineEdit === null ? null : evaluate(setup, baselineEdit)),
    [setup, baselineEdit],
  );
  // Margins come one frame after the trial: the new gain and its trial are drawn at once, the
  // frequency-domain figures follow as soon as they are computed.
  // A Smith predictor's or a cascade's loop is not the PID loop: tune computes their margins.
  const marginsOf = (e: GainEdit): MarginsView | null => {
    const structured = structureMarginsView(setup, e);
    return structured === undefined ? props.notices.margins(runningGains(e)) : structured;
  };
  const noiseNow = useMemo(() => noiseNotice(setup, state.current), [setup, state.current.gains, state.current.structure, frameId(state.current)]);
  const marginsNow = useDeferred(() => marginsOf(state.current), [props.notices, state.current.gains, frameId(state.current)]);
  const marginsBase = useDeferred(() => (baselineEdit === null ? null : marginsOf(baselineEdit)), [props.notices, baselineEdit]);
  // The sweep runs the plain law: a structure around it (a comparison candidate) has no envelope here.
  const envelopeNote =
    state.current.frame?.extended === true ? `plain law only, not ${state.current.frame.named}` : state.mode !== 'instant' || rehearsing ? 'instant trial only' : null;
  const envelope = useEnvelope(setup, state.current, state.envelope && envelopeNote === null);
  const plantNotices = useMemo(() => {
    const list = props.notices.plantNotices();
    for (const b of setup.basis) list.push({ tone: 'info', title: namedOf(state.file), text: b });
    for (const g of fileGainSwitches(trial)) {
      list.push({ tone: 'info', text: `the file's trial switches gains at ${g.at} s ('${g.label}'); the screen runs the edited set throughout (g rehearses a switch)` });
    }
    return list;
  }, [props.notices, trial, setup]);

  // ---------------------------------------------------------------- live run
  const live = useRef<LiveRun | null>(null);
  const achieved = useRef(NaN);
  const [, setFrame] = useState(0);
  if (state.mode === 'live' && live.current === null) live.current = new LiveRun(setup, state.current, trial.duration);
  const speed = speedOf(state);
  // The timer reads the newest state: a pause must stop the run at once, not after the effect
  // that clears the timer has run.
  const latest = useRef(state);
  latest.current = state;
  useEffect(() => {
    if (live.current?.setGains(state.current) === true) {
      achieved.current = NaN;
      // In instant mode the (paused) live run restarts unseen: nothing to tell.
      if (latest.current.mode === 'live') dispatch({ type: 'notify', message: { text: 'live run restarted: the edited set runs another controller structure', tone: 'info' } });
    }
  }, [state.current.gains, state.current.structure, frameId(state.current)]);
  useEffect(() => {
    if (state.mode !== 'live' || state.paused) return undefined;
    let last = performance.now();
    const period = props.tickMs ?? 50;
    const timer = setInterval(() => {
      const run = live.current;
      if (run === null || latest.current.paused || latest.current.mode !== 'live') return;
      const t = performance.now();
      const wall = (t - last) / 1000;
      last = t;
      if (run.diverged) return;
      const done = run.advance(speed * wall, LIVE_BUDGET_MS);
      // Smoothed achieved speed, shown when the machine cannot keep up. A tick that kept up ran
      // at the asked speed (it may have run no sample at all: the fraction waits for the next).
      const inst = !run.behind ? speed : wall > 0 ? done / wall : NaN;
      achieved.current = Number.isNaN(achieved.current) ? inst : 0.8 * achieved.current + 0.2 * inst;
      // No sample ran, nothing on the screen changed: no frame.
      if (done > 0) setFrame((f) => f + 1);
    }, period);
    return () => clearInterval(timer);
  }, [state.mode, state.paused, speed]);

  // ---------------------------------------------------------------- effects
  const loaded = useRef(props.text);
  useEffect(() => {
    if (state.effects.length === 0) return;
    const effects = state.effects;
    dispatch({ type: 'effects_taken', count: effects.length });
    for (const e of effects) runEffect(e);
  }, [state.effects]);

  function runEffect(e: Effect): void {
    const run = live.current;
    switch (e.kind) {
      case 'quit':
        props.onExit(0);
        exit();
        return;
      case 'save':
        save(e.onDiskText);
        return;
      case 'setpoint_step':
        if (run !== null) {
          const r = run.stepSetpoint(e.sign);
          dispatch({ type: 'notify', message: { text: `setpoint -> ${Number(r.toPrecision(6))}`, tone: 'info' } });
        }
        return;
      case 'disturbance_step':
        if (run !== null) {
          const d = run.stepDisturbance(e.sign);
          dispatch({
            type: 'notify',
            message: d === null ? { text: 'this plant has no disturbance input', tone: 'warn' } : { text: `${d.name} -> ${Number(d.value.toPrecision(6))}`, tone: 'info' },
          });
        }
        return;
      case 'manual':
        run?.setManual(e.on);
        return;
      case 'restart_live':
        run?.restart();
        achieved.current = NaN;
        setFrame((f) => f + 1);
        return;
      default:
        aids.run(e, state.current);
        return;
    }
  }

  function save(onDiskText: boolean): void {
    // null: the file was deleted since loading; the loaded text gets the edit and is written anew.
    let disk: string | null;
    try {
      disk = props.io.readText(props.filePath);
    } catch (error) {
      if ((error as { code?: string }).code !== 'ENOENT') {
        // Unreadable is not absent: never write over a file we could not compare.
        dispatch({ type: 'save_failed', text: `not written: cannot read ${props.fileName}: ${(error as Error).message}` });
        return;
      }
      disk = null;
    }
    if (!onDiskText && disk !== null && disk !== loaded.current) {
      dispatch({ type: 'save_conflict' });
      return;
    }
    // The record beside each saved value: today's date and where the gains came from.
    const plan = planSave(onDiskText && disk !== null ? disk : loaded.current, state.file, state.current, fileForm, gainNote(new Date().toISOString().slice(0, 10), 'screen'));
    if (!plan.ok) {
      dispatch({ type: 'save_failed', text: `not written: ${plan.error}` });
      return;
    }
    // Never write a file the loader would reject.
    const check = loadPlant(plan.text, props.fileName);
    if (check.plant === undefined) {
      dispatch({ type: 'save_failed', text: `not written: the edited file would not load (${check.diagnostics[0]?.message ?? 'unknown error'})` });
      return;
    }
    let notes: readonly string[];
    try {
      notes = props.io.writeText(props.filePath, plan.text, { expectExisting: true })?.notes ?? [];
    } catch (error) {
      dispatch({ type: 'save_failed', text: `cannot write ${props.fileName}: ${(error as Error).message}` });
      return;
    }
    loaded.current = plan.text;
    dispatch({ type: 'saved', notes: plan.formNote === null ? notes : [...notes, plan.formNote], warn: notes.length > 0 });
  }

  // ---------------------------------------------------------------- keys
  useInput((input, key) => {
    // While a value is typed the text field takes the keys (a read that carries Enter submits
    // there); only Esc is ours. Judged on the state the read met: the field may have closed the
    // prompt before these tokens are reduced, and '200 s' must not then step the setpoint.
    const typing = latest.current.overlay.kind === 'input';
    for (const token of keyTokens(input, key)) if (!typing || token === 'esc') dispatch({ type: 'press', token });
  });

  useEffect(() => {
    props.onFrame?.();
  });

  // ---------------------------------------------------------------- draw
  const run = state.mode === 'live' ? live.current : null;
  const simTime = run !== null ? run.time : trial.duration;
  const nowLabel = rehearsing ? 'rehearsal' : 'now';
  const metricInput: MetricInput = { metrics: now.metrics, checks: now.checks, margins: marginsNow, diverged: now.result.status === 'diverged' };
  const baseInput: MetricInput | null =
    base === null ? null : { metrics: base.metrics, checks: base.checks, margins: marginsBase, diverged: base.result.status === 'diverged' };

  const notices: Notice[] = [...plantNotices];
  if (noiseNow !== null) notices.unshift(noiseNow);
  if (now.result.status === 'diverged') notices.unshift({ tone: 'bad', text: `the trial diverged at ${fmt(now.result.divergedAt)} s` });
  if (run?.diverged) notices.unshift({ tone: 'bad', text: `the live run diverged at ${fmt(run.divergedAt)} s (z restarts)` });
  for (const w of now.result.warnings) notices.push({ tone: 'warn', text: w });
  if (rehearsing && run === null) {
    // The bump the switch itself causes, read as `looprig diff` reads it (tune's switchBump).
    const bump = switchBump(now.result.trace, setup.config.sampleTime, state.switchAt, switchWindowEnd(trial, state.switchAt));
    if (bump !== null) {
      notices.unshift({
        tone: 'info',
        title: 'switch',
        text: `at ${fmt(bump.sampleAt)} s: controller jumps ${fmt(bump.uJump)}, output moves at most ${fmt(bump.yPeak)} until ${fmt(bump.windowEnd)} s`,
      });
    }
  }

  const body = (() => {
    const o = state.overlay;
    const bodyLines = layout.lines - 3;
    if (o.kind === 'caution') return <CautionOverlay width={layout.width} height={bodyLines} theme={theme} />;
    if (o.kind === 'help') return <HelpOverlay width={layout.width} height={bodyLines} theme={theme} page={o.page} />;
    if (o.kind === 'suggest') return <SuggestPanel view={o.view} selected={o.selected} width={layout.width} height={bodyLines} theme={theme} />;
    if (o.kind === 'optimize') {
      return <OptimizePanel view={o.view} outcome={o.outcome} cancelling={o.cancelling} width={layout.width} height={bodyLines} theme={theme} />;
    }
    if (o.kind === 'compare') {
      return (
        <CompareOverlay
          result={o.entries === null ? null : aids.compare}
          selected={o.selected}
          edited={o.edited === null ? null : (o.entries?.[o.edited]?.name ?? null)}
          width={layout.width}
          height={bodyLines}
          theme={theme}
        />
      );
    }
    return (
      <Panels
        layout={layout}
        theme={theme}
        state={state}
        now={now}
        base={base}
        run={run}
        req={req}
        metricRowsNow={metricRows(req, metricInput, baseInput, layout.bottomRows - (layout.marginsInMetrics ? 2 : 1))}
        nowLabel={nowLabel}
        notices={notices}
        margins={marginsNow}
        actuator={plant.actuator}
        envelope={envelope}
        envelopeNote={state.envelope ? envelopeNote : null}
      />
    );
  })();

  return (
    <Box flexDirection="column" width={layout.width} height={layout.lines + messageRows - 1}>
      <StatusLine
        fileName={props.fileName}
        dirty={isDirty(state)}
        mode={state.mode}
        speed={speed}
        achieved={achieved.current}
        paused={state.paused}
        time={simTime}
        manual={state.manual}
        structure={namedOf(state.current)}
        form={state.current.form}
        rehearseAt={rehearsing ? state.switchAt : null}
        baseline={state.baseline === null ? null : state.baseline.label === 'file' ? "file's gains" : 'kept set'}
        width={layout.width}
        theme={theme}
      />
      {body}
      <MessageLine state={state} width={layout.width} theme={theme} notices={layout.noticesWidth > 0 ? [] : notices} dispatch={dispatch} />
      <Line pieces={[{ text: hintFor(state.overlay), color: theme.dim }]} width={layout.width} color={theme.color} />
    </Box>
  );
}

/**
 * A value computed just after the frame that needs it: 'pending' until then. The computation
 * runs on the next turn of the event loop, so a key's frame is never held up by it.
 */
function useDeferred<T>(compute: () => T, deps: readonly unknown[]): T | 'pending' {
  const [value, setValue] = useState<{ deps: readonly unknown[]; value: T } | null>(null);
  useEffect(() => {
    const id = setImmediate(() => setValue({ deps, value: compute() }));
    return () => clearImmediate(id);
  }, deps);
  const fresh = value !== null && value.deps.length === deps.length && value.deps.every((d, i) => Object.is(d, deps[i]));
  return fresh ? value.value : 'pending';
}

/** The hint line: the main keys, or the keys of the open list or view. */
function hintFor(o: Overlay): string {
  switch (o.kind) {
    case 'suggest':
      return LIST_HINT;
    case 'optimize':
      return o.outcome === null ? 'Esc stops the optimiser (the best so far is offered)' : 'Enter apply  Esc discard';
    case 'compare':
      return '↑↓ Tab switch the edited candidate  Esc back';
    default:
      return HINT;
  }
}

function fmt(v: number | null): string {
  return v === null ? '?' : String(Number(v.toPrecision(4)));
}

interface PanelsProps {
  layout: Layout;
  theme: Theme;
  state: ScreenState;
  now: Evaluation;
  base: Evaluation | null;
  run: LiveRun | null;
  req: Requirements;
  metricRowsNow: ReturnType<typeof metricRows>;
  nowLabel: string;
  notices: Notice[];
  margins: MarginsView | null | 'pending';
  actuator: { min: number; max: number };
  /** The robustness envelope (null: not wanted, or not drawn in this mode). */
  envelope: EnvelopeState | null;
  /** Why the envelope asked for is not drawn (null: drawn, or not asked for). */
  envelopeNote: string | null;
}

function Panels(p: PanelsProps) {
  const { layout, theme, state } = p;
  const w = layout.width;
  const colors: Record<string, string | undefined> = {
    pv: theme.pv,
    sp: theme.sp,
    baseline: theme.baseline,
    band: theme.band,
    output: theme.output,
    limit: theme.limit,
    envelope: theme.envelope,
  };
  const points = pointsForWidth(w);
  let trace = p.now.result.trace;
  let t0 = 0;
  let t1 = state.trialDuration;
  // The bands sit around what each step is measured against (its final value once settled).
  let steps: BandStep[] = p.now.metrics.steps.map((s) => ({ at: s.at, end: s.end, to: s.target, change: s.target - s.from, band: s.band }));
  let baselineTrace = p.base?.result.trace ?? null;
  if (p.run !== null) {
    trace = p.run.trace();
    // Scroll over the last `window` seconds; before that, zoom out as the run grows so an
    // early response is not squeezed into the left edge.
    t0 = Math.max(0, p.run.time - p.run.window);
    t1 = Math.max(p.run.time, t0 + p.run.window / 6);
    steps = p.run.bandSteps();
    baselineTrace = null;
  }
  const legend: Piece[] = [
    { text: '╌ SP ', color: theme.sp },
    { text: '─ PV ', color: theme.pv },
  ];
  if (baselineTrace !== null) legend.push({ text: p.state.rehearse ? '· baseline only ' : '· baseline ', color: theme.baseline });
  if (p.req.overshootPct !== undefined || p.req.settlingTime !== undefined) legend.push({ text: '- limits ', color: theme.band });
  const env = p.run === null ? p.envelope : null;
  if (env !== null) legend.push({ text: envelopeLegend(env), color: theme.envelope });
  else if (p.envelopeNote !== null) legend.push({ text: `░ envelope: ${p.envelopeNote} `, color: theme.dim });
  const title = p.run !== null ? 'Live trend' : p.state.rehearse ? 'Rehearsal trend' : 'Trial trend';
  const marks = p.run === null && p.state.rehearse ? [{ at: p.state.switchAt, ch: '▲' }] : [];
  if (marks.length > 0) legend.push({ text: '▲ switch ', color: theme.baseline });

  const showTrend = layout.trendRows > 0;
  const trendGrid = showTrend
    ? renderChart(
        trendSeries({
          trace,
          baseline: baselineTrace,
          t0,
          t1,
          points,
          band: bandLines(steps, p.req),
          envelope: env?.envelope ? { t: env.envelope.t, lo: env.envelope.lo, hi: env.envelope.hi, length: env.envelope.t.length } : null,
        }),
        { width: w, height: layout.trendRows, labelWidth: LABEL_WIDTH },
      )
    : null;
  const outputGrid =
    layout.outputRows > 0
      ? renderChart(outputSeries(trace, baselineTrace, t0, t1, points, p.actuator), {
          width: w,
          height: layout.outputRows,
          labelWidth: LABEL_WIDTH,
        })
      : null;

  const gainsW = layout.gainsWidth;
  const bottom = (
    <Box flexDirection="column" width={w}>
      <Line pieces={bottomHeading(layout, theme)} width={w} color={theme.color} />
      <Box flexDirection="row" width={w}>
        <GainsPanel
          edit={state.current}
          baseline={state.baseline?.edit ?? null}
          selected={state.selected}
          width={gainsW}
          rows={layout.bottomRows}
          theme={theme}
        />
        {layout.metricsWidth > 0 && <Separator rows={layout.bottomRows} theme={theme} />}
        {layout.metricsWidth > 0 && (
          <MetricsPanel
            rows={p.metricRowsNow}
            nowLabel={p.nowLabel}
            width={layout.metricsWidth}
            height={layout.bottomRows}
            theme={theme}
            note={layout.marginsInMetrics ? marginsLine(p.margins, theme) : null}
          />
        )}
        {layout.noticesWidth > 0 && <Separator rows={layout.bottomRows} theme={theme} />}
        {layout.noticesWidth > 0 && (
          <NoticesPanel notices={p.notices} margins={marginsLine(p.margins, theme)} width={layout.noticesWidth} height={layout.bottomRows} theme={theme} />
        )}
      </Box>
    </Box>
  );

  if (layout.tier === 'tiny') {
    return (
      <Box flexDirection="column" width={w}>
        <Line pieces={[{ text: `terminal too small for the trend (needs 60x16)`, color: theme.warn }]} width={w} color={theme.color} />
        <GainsPanel
          edit={state.current}
          baseline={state.baseline?.edit ?? null}
          selected={state.selected}
          width={w}
          rows={layout.bottomRows}
          theme={theme}
        />
      </Box>
    );
  }
  return (
    <Box flexDirection="column" width={w}>
      {trendGrid !== null && (
        <ChartPanel title={title} legend={legend} grid={trendGrid} t0={t0} t1={t1} width={w} theme={theme} colors={colors} marks={marks} axis={layout.trendAxis} />
      )}
      {outputGrid !== null && (
        <ChartPanel
          title="Controller output"
          legend={[
            { text: '─ u ', color: theme.output },
            ...(baselineTrace !== null ? [{ text: '· baseline ', color: theme.baseline }] : []),
            { text: '= limits ', color: theme.limit },
          ]}
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

/** The envelope's legend entry: its cases, or how far its sweep has come. */
function envelopeLegend(e: EnvelopeState): string {
  if (e.error !== null) return `░ envelope failed: ${e.error} `;
  if (e.total === 0) return '░ envelope … ';
  const cases = e.done < e.total ? `${e.done}/${e.total} cases…` : `${e.total} cases`;
  // The widest spread, so that an envelope hidden under the PV line still says how wide it is.
  let spread = 0;
  const env = e.envelope;
  if (env !== null) for (let i = 0; i < env.t.length; i++) if (Number.isFinite(env.hi[i] - env.lo[i])) spread = Math.max(spread, env.hi[i] - env.lo[i]);
  return `░ envelope ${cases}, spread ≤ ${Number(spread.toPrecision(2))}${e.anyDiverged ? ', one diverges' : ''} `;
}

/** The margins of the edited gains as one notices line, or null without a diagnosis. */
function marginsLine(m: MarginsView | null | 'pending', theme: Theme): Piece[] | null {
  if (m === null) return null;
  if (m === 'pending') return [{ text: 'margins …', color: theme.dim }];
  if (m.closedLoopStable === false) return [{ text: 'closed loop UNSTABLE', color: theme.bad, bold: true }];
  const f = (v: number, unit = ''): string => (Number.isFinite(v) ? `${Number(v.toPrecision(3))}${unit}` : v > 0 ? '∞' : '—');
  return [{ text: `GM ${f(m.gainMargin)}  PM ${f(m.phaseMarginDeg, '°')}  Ms ${f(m.maxSensitivity)}`, bold: true }];
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

/** Most lines a message may take; beyond that its last line ends in '…'. */
const MESSAGE_MAX_LINES = 4;

/** The message (or question) as word-wrapped lines of `width`; one line when there is none. */
function messageLines(state: ScreenState, width: number): string[] {
  const o = state.overlay;
  const text = o.kind === 'confirm' ? `${o.text} (y/n)` : o.kind !== 'input' && state.message !== null ? state.message.text : '';
  const lines = wrap(text, width);
  if (lines.length === 0) return [''];
  if (lines.length <= MESSAGE_MAX_LINES) return lines;
  const kept = lines.slice(0, MESSAGE_MAX_LINES);
  kept[MESSAGE_MAX_LINES - 1] = `${kept[MESSAGE_MAX_LINES - 1].slice(0, width - 1)}…`;
  return kept;
}

function MessageLine(p: {
  state: ScreenState;
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
  const lines = messageLines(state, width);
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
