/**
 * The terminal screen. Keys become reducer actions (keymap.ts -> state.ts); the core answers
 * every question about the loop (engine.ts, live-run.ts); this component only wires the two
 * together and draws the panels that fit the terminal (layout.ts).
 */
import { Box, useApp, useInput, useStdout } from 'ink';
import { useEffect, useMemo, useReducer, useRef, useState } from 'react';
import { defaultSwitchTime, switchBump, switchWindowEnd } from '../tune/index.js';
import { plantUnits, withUnit } from '../model/index.js';
import type { PidForm } from '../model/types.js';
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
import { frameId, namedOf, sameEdit, type GainEdit } from './gain-edit.js';
import { useEnvelope } from './hooks/use-envelope.js';
import { useLiveRun } from './hooks/use-live-run.js';
import { useSave, type ScreenIo } from './hooks/use-save.js';
import { useTuningAids } from './hooks/use-tuning-aids.js';
import { FREQUENCY_HINT } from './frequency-keys.js';
import { frequencyViewData, shapeStep } from './frequency-view.js';
import { FrequencyPanel } from './panels/FrequencyPanel.js';
import { fittingText, HINT, HINT_SHORTER, LIST_HINT, keyTokens } from './keymap.js';
import { computeLayout } from './layout.js';
import { metricRows, type MetricInput } from './metric-rows.js';
import type { MarginsView, Notice, NoticeSource } from './notices.js';
import { CautionOverlay } from './panels/CautionOverlay.js';
import { CompareOverlay } from './panels/CompareOverlay.js';
import { gainPanelLines } from './panels/GainsPanel.js';
import { HelpOverlay } from './panels/HelpOverlay.js';
import { Line } from './panels/line.js';
import { MessageLine, messageLines } from './panels/MessageLine.js';
import { noiseNotice } from './noise-notice.js';
import { OptimizePanel } from './panels/OptimizePanel.js';
import { Panels } from './panels/Panels.js';
import { StatusLine } from './panels/StatusLine.js';
import { SuggestPanel } from './panels/SuggestPanel.js';
import { TweakView } from './tweak-view.js';
import { initialState, isDirty, reduce, speedOf, type Action, type Effect, type Overlay, type RunMode, type ScreenState } from './state.js';
import { makeTheme } from './theme.js';

export type { ScreenIo } from './hooks/use-save.js';

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
  const units = plantUnits(plant);
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

  // ---------------------------------------------------------------- frequency view
  // The edited set at its worst operating point, the set in service (a pinned one, else the
  // file's gains) overlaid when it differs; one frequency per braille dot across the screen.
  const freqOpen = state.overlay.kind === 'frequency';
  // The width every line is cut to (the layout's, which is worked out below, after the notices).
  const screenWidth = Math.max(20, Math.floor(size.columns || 80));
  const inService = state.baseline?.edit ?? state.file;
  const freqData = useMemo(
    () => (freqOpen ? frequencyViewData(setup, setup.context().points, state.current, sameEdit(inService, state.current) ? null : inService, 2 * screenWidth) : null),
    [freqOpen, setup, state.current, inService, screenWidth],
  );

  // ---------------------------------------------------------------- live run
  const liveRun = useLiveRun(setup, state, trial.duration, props.tickMs ?? 50, dispatch);
  const speed = speedOf(state);
  const save = useSave({ io: props.io, filePath: props.filePath, fileName: props.fileName, text: props.text, fileForm }, dispatch);

  // ---------------------------------------------------------------- effects
  useEffect(() => {
    if (state.effects.length === 0) return;
    const effects = state.effects;
    dispatch({ type: 'effects_taken', count: effects.length });
    for (const e of effects) runEffect(e);
  }, [state.effects]);

  function runEffect(e: Effect): void {
    const run = liveRun.run;
    switch (e.kind) {
      case 'quit':
        props.onExit(0);
        exit();
        return;
      case 'save':
        save(state, e.onDiskText, e.structure === true);
        return;
      case 'setpoint_step':
        if (run !== null) {
          const r = run.stepSetpoint(e.sign);
          dispatch({ type: 'notify', message: { text: `setpoint -> ${withUnit(String(Number(r.toPrecision(6))), units.output)}`, tone: 'info' } });
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
        liveRun.restart();
        return;
      case 'shape': {
        const r = freqData === null ? null : shapeStep(setup, setup.context().points, freqData, state.current, e.command, e.from);
        if (r === null) dispatch({ type: 'notify', message: { text: 'no crossover to shape from: type the gains first', tone: 'warn' } });
        else dispatch({ type: 'shaped', ...r });
        return;
      }
      default:
        aids.run(e, state.current);
        return;
    }
  }

  // ---------------------------------------------------------------- keys
  // The handler reads the newest overlay, not the one of the render it was made in.
  const latestOverlay = useRef(state.overlay);
  latestOverlay.current = state.overlay;
  useInput((input, key) => {
    // While a value is typed the text field takes the keys (a read that carries Enter submits
    // there); only Esc and Ctrl-C (quit, asking first with unsaved changes) are ours. Judged on the state the read met: the field may have closed the
    // prompt before these tokens are reduced, and '200 s' must not then step the setpoint.
    const typing = latestOverlay.current.kind === 'input';
    for (const token of keyTokens(input, key)) if (!typing || token === 'esc' || token === 'ctrl-c') dispatch({ type: 'press', token });
  });

  useEffect(() => {
    props.onFrame?.();
  });

  // ---------------------------------------------------------------- draw
  const run = state.mode === 'live' ? liveRun.run : null;
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

  // A long message (a save error naming a path) is wrapped, not cut: the charts give up the rows.
  // Without the notices column the first notice takes the message line, on two lines if it needs them.
  const columnFree = computeLayout(size.columns, size.rows, gainPanelLines(state.current)).noticesWidth > 0;
  const footNotice = columnFree ? null : (notices[0] ?? null);
  const message = messageLines(state, screenWidth, footNotice);
  const messageRows = message.length;
  const layout = computeLayout(size.columns, size.rows - (messageRows - 1), gainPanelLines(state.current));

  const body = (() => {
    const o = state.overlay;
    const bodyLines = layout.lines - 3;
    if (o.kind === 'caution') return <CautionOverlay width={layout.width} height={bodyLines} theme={theme} />;
    if (o.kind === 'frequency' && freqData !== null) {
      return (
        <FrequencyPanel
          data={freqData}
          edit={state.current}
          selected={state.selected}
          serviceName="in service"
          page={o.page}
          target={o.target}
          width={layout.width}
          height={bodyLines}
          theme={theme}
        />
      );
    }
    if (o.kind === 'help') return <HelpOverlay width={layout.width} height={bodyLines} theme={theme} page={o.page} />;
    if (o.kind === 'tweak') return <TweakView setup={setup} edit={state.current} selected={state.selected} width={layout.width} height={bodyLines} theme={theme} />;
    if (o.kind === 'suggest') return <SuggestPanel view={o.view} selected={o.selected} fileStructure={state.file.structure} width={layout.width} height={bodyLines} theme={theme} />;
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
        terminal={size}
        layout={layout}
        theme={theme}
        state={state}
        now={now}
        base={base}
        run={run}
        req={req}
        metricRowsNow={metricRows(req, metricInput, baseInput, layout.bottomRows - (layout.marginsInMetrics ? 2 : 1), units)}
        nowLabel={nowLabel}
        notices={notices}
        margins={marginsNow}
        actuator={plant.actuator}
        units={units}
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
        achieved={liveRun.achieved}
        paused={state.paused}
        time={simTime}
        manual={state.manual}
        structure={namedOf(state.current)}
        form={state.current.form}
        rehearseAt={rehearsing ? state.switchAt : null}
        baseline={state.baseline === null ? null : state.baseline.label === 'file' ? 'file' : 'pinned'}
        width={layout.width}
        theme={theme}
      />
      {body}
      <MessageLine state={state} lines={message} width={layout.width} theme={theme} notice={footNotice} dispatch={dispatch} />
      <Line pieces={[{ text: hintFor(state.overlay, layout.width), color: theme.dim }]} width={layout.width} color={theme.color} />
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

/** The hint line: the main keys, or the keys of the open list or view, in words that fit `width`. */
function hintFor(o: Overlay, width: number): string {
  switch (o.kind) {
    case 'suggest':
      return LIST_HINT;
    case 'optimize':
      return o.outcome === null ? fittingText(['Esc stops the optimiser (the best so far is offered)', 'Esc stops the optimiser'], width) : 'Enter apply  Esc discard';
    case 'compare':
      return fittingText(['↑↓ Tab switch the edited candidate  Esc back', '↑↓ switch candidate  Esc back'], width);
    case 'frequency':
      return FREQUENCY_HINT;
    case 'tweak':
      return '↑↓ choose  ←→ [] nudge  u r undo/redo  T Esc close';
    default:
      return fittingText([HINT, ...HINT_SHORTER], width);
  }
}

function fmt(v: number | null): string {
  return v === null ? '?' : String(Number(v.toPrecision(4)));
}

