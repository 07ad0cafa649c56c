/**
 * `looprig diff` as text, as Markdown (a pull-request comment: the verdict first, then compact
 * tables) and as one JSON document. Printing only: every number comes from the DiffReport.
 */
import type { CheckRow } from './check-plant.js';
import type { DiffReport, FigureDelta, VerdictDelta } from './diff-report.js';
import { num, table } from './format.js';
import { finiteOrNull } from './json.js';

function withUnit(v: number, unit: string): string {
  if (v === Infinity) return 'inf';
  if (!Number.isFinite(v)) return '-';
  return unit === '' ? num(v, 4) : unit === '%' ? `${num(v, 4)} %` : `${num(v, 4)} ${unit}`;
}

function signed(v: number, unit: string): string {
  if (!Number.isFinite(v)) return '';
  if (v === 0) return '0';
  return `${v > 0 ? '+' : ''}${withUnit(v, unit)}`;
}

function limitText(r: CheckRow): string {
  return `${r.kind === 'max' ? '<=' : '>='} ${withUnit(r.limit, r.unit)}`;
}

function rowText(r: CheckRow | null): string {
  if (r === null) return '-';
  const verdict = r.status === 'pass' ? 'pass' : r.status === 'fail' ? 'FAIL' : 'N/A';
  return `${r.status === 'n/a' ? 'n/a' : withUnit(r.measured, r.unit)} ${verdict}`;
}

/** The limit of a verdict row, both when the change moved it. */
function limits(v: VerdictDelta): string {
  const a = v.before === null ? null : limitText(v.before);
  const b = v.after === null ? null : limitText(v.after);
  return a !== null && b !== null && a !== b ? `${a} -> ${b}` : (b ?? a ?? '-');
}

const MARK: Readonly<Record<VerdictDelta['change'], string>> = {
  'newly fails': 'NEWLY FAILS',
  'newly passes': 'newly passes',
  'still fails': 'still fails',
  'still passes': '',
  'new, passes': 'new, passes',
  removed: 'removed',
};

function verdictLine(r: DiffReport): string {
  const passes = r.verdicts.filter((v) => v.change === 'newly passes').length;
  const head =
    r.newlyFailing > 0
      ? `${r.newlyFailing} requirement${r.newlyFailing === 1 ? '' : 's'} newly fail${r.newlyFailing === 1 ? 's' : ''}`
      : 'no requirement newly fails';
  return passes > 0 ? `${head}; ${passes} newly pass${passes === 1 ? 'es' : ''}` : head;
}

function title(r: DiffReport): string {
  return `${r.before.plant === null ? `(new file; absent at ${r.before.label.split(':')[0]})` : r.before.label} -> ${r.after.label}`;
}

function formOf(r: DiffReport, side: 'before' | 'after'): string | null {
  const c = r[side].plant?.loop.controller;
  return c === undefined ? null : `${c.named ?? c.structure}, ${c.form} form`;
}

/** "controller (pid, ideal form)", both when the change moved the structure or form. */
function controllerHeading(r: DiffReport): string {
  const a = formOf(r, 'before');
  const b = formOf(r, 'after');
  return `controller (${a !== null && a !== b ? `${a} -> ${b}` : b})`;
}

function figureRows(list: readonly FigureDelta[]): string[][] {
  return list.map((f) => [f.name, withUnit(f.before, f.beforeUnit), withUnit(f.after, f.unit), signed(f.change, f.unit), f.note]);
}

function rehearsalLines(r: DiffReport): string[] {
  const h = r.rehearsal;
  if (h === null) return [r.rehearsalNote];
  const b = h.run.bump;
  const lines = [`${r.rehearsalNote}; switch at ${num(h.run.trial.events.find((e) => e.kind === 'gains')!.at)} s`];
  if (b === null) return [...lines, 'the switch falls after the end of the run (it diverged before it, or the trial is shorter)'];
  lines.push(
    `output ${num(b.yBefore)} and controller output ${num(b.uBefore)} before the switch (sample at ${num(b.sampleAt)} s); window to ${num(b.windowEnd)} s`,
    `controller output jump at the switch ${signed(b.uJump, '') || '0'}; largest controller move ${signed(b.uPeak, '') || '0'}`,
    `largest output move ${signed(b.yPeak, '') || '0'} (${num(b.yPeakAfter)} s after the switch); output shift by the window's end ${signed(b.yShift, '') || '0'}`,
  );
  if (h.run.result.status === 'diverged') lines.push(`the rehearsal diverged at t = ${num(h.run.result.divergedAt ?? NaN)} s`);
  return lines;
}

function indent(text: string): string {
  return text
    .split('\n')
    .map((l) => `  ${l}`)
    .join('\n');
}

/** The human-readable report. */
export function diffText(r: DiffReport): string {
  const out: string[] = [`${r.after.plant!.name}: ${title(r)}`, ''];
  if (r.changes.length === 0) out.push('no field of the file changed');
  else {
    out.push('changes in the file:');
    const rows = r.changes.map((c) => [c.section === 'controller' ? controllerHeading(r) : c.section, c.path, c.before ?? '(absent)', '->', c.after ?? '(absent)']);
    out.push(indent(table(rows)));
  }
  const statusOf = (s: 'before' | 'after'): string => {
    const e = r[s].evaluation;
    return e === null ? '-' : e.check.nominal.result.status === 'diverged' ? `DIVERGED at ${num(e.check.nominal.result.divergedAt ?? NaN)} s` : 'ok';
  };
  out.push('', 'loop, before -> after:');
  out.push(indent(table([['FIGURE', 'BEFORE', 'AFTER', 'CHANGE', 'NOTE'], ['trial', statusOf('before'), statusOf('after'), '', ''], ...figureRows(r.metrics), ...figureRows(r.margins)])));
  if (r.verdicts.length > 0) {
    out.push('', 'requirements:');
    const rows = [['REQUIREMENT', 'CASE', 'LIMIT', 'BEFORE', 'AFTER', 'CHANGE']];
    for (const v of r.verdicts) rows.push([v.requirement, v.scope, limits(v), rowText(v.before), rowText(v.after), MARK[v.change]]);
    out.push(indent(table(rows)));
  } else out.push('', 'requirements: none in either version');
  out.push('', 'switch rehearsal:', ...rehearsalLines(r).map((l) => `  ${l}`));
  if (r.notes.length > 0) out.push('', 'notes:', ...r.notes.map((n) => `  ${n}`));
  out.push('', verdictLine(r));
  return `${out.join('\n')}\n`;
}

const cell = (s: string): string => s.replace(/\|/g, '\\|');

function mdTable(head: readonly string[], rows: readonly (readonly string[])[], align: readonly ('l' | 'r')[]): string[] {
  return [
    `| ${head.map(cell).join(' | ')} |`,
    `|${align.map((a) => (a === 'r' ? '---:' : '---')).join('|')}|`,
    ...rows.map((r) => `| ${r.map(cell).join(' | ')} |`),
  ];
}

/** The Markdown report: the verdict, then changed fields, verdict changes, figures, rehearsal. */
export function diffMarkdown(r: DiffReport): string {
  const out: string[] = [`### looprig diff: ${r.after.plant!.name}`, '', `\`${title(r)}\``, ''];
  out.push(r.newlyFailing > 0 ? `**${verdictLine(r)}**` : verdictLine(r), '');
  if (r.changes.length > 0) {
    out.push(
      ...mdTable(
        ['changed', 'field', 'before', 'after'],
        r.changes.map((c) => [c.section === 'controller' ? controllerHeading(r) : c.section, `\`${c.path}\``, c.before ?? '(absent)', c.after ?? '(absent)']),
        ['l', 'l', 'r', 'r'],
      ),
      '',
    );
  } else out.push('No field of the file changed.', '');
  if (r.verdicts.length > 0) {
    out.push(
      ...mdTable(
        ['requirement', 'case', 'limit', 'before', 'after', 'change'],
        r.verdicts.map((v) => [v.requirement, v.scope, limits(v), rowText(v.before), rowText(v.after), v.change === 'newly fails' ? '**newly fails**' : MARK[v.change]]),
        ['l', 'l', 'r', 'r', 'r', 'l'],
      ),
      '',
    );
  }
  const shown = [...r.metrics, ...r.margins].filter((f) => Number.isFinite(f.before) || Number.isFinite(f.after));
  out.push(...mdTable(['figure', 'before', 'after', 'change'], shown.map((f) => [f.name, withUnit(f.before, f.beforeUnit), withUnit(f.after, f.unit), signed(f.change, f.unit)]), ['l', 'r', 'r', 'r']), '');
  out.push(`**Switch rehearsal:** ${rehearsalLines(r).join('; ')}`, '');
  if (r.notes.length > 0) out.push(...r.notes.map((n) => `- ${n}`), '');
  return `${out.join('\n')}`;
}

function figureJson(f: FigureDelta): unknown {
  return { name: f.name, unit: f.unit, before_unit: f.beforeUnit, before: finiteOrNull(f.before), after: finiteOrNull(f.after), change: finiteOrNull(f.change), note: f.note };
}

function rowJson(r: CheckRow | null): unknown {
  return r === null ? null : { measured: finiteOrNull(r.measured), infinite: r.measured === Infinity, limit: r.limit, status: r.status, note: r.note };
}

/** The `--json` document. */
export function diffJson(r: DiffReport, exitCode: number): unknown {
  const h = r.rehearsal;
  const side = (s: 'before' | 'after'): unknown => {
    const d = r[s];
    const c = d.plant?.loop.controller;
    return {
      label: d.label,
      exists: d.plant !== null,
      plant: d.plant?.name ?? null,
      controller: c === undefined ? null : { structure: c.named ?? c.structure, form: c.form, values: c.values },
      status: d.evaluation?.check.nominal.result.status ?? null,
      diverged_at: d.evaluation?.check.nominal.result.divergedAt ?? null,
    };
  };
  return {
    exit_code: exitCode,
    newly_failing: r.newlyFailing,
    before: side('before'),
    after: side('after'),
    changes: r.changes.map((c) => ({ section: c.section, path: c.path, before: c.before, after: c.after })),
    metrics: r.metrics.map(figureJson),
    margins: r.margins.map(figureJson),
    requirements: r.verdicts.map((v) => ({
      name: v.requirement,
      case: v.scope,
      kind: v.kind,
      unit: v.unit,
      change: v.change,
      before: rowJson(v.before),
      after: rowJson(v.after),
    })),
    rehearsal:
      h === null
        ? { ran: false, note: r.rehearsalNote }
        : {
            ran: true,
            note: r.rehearsalNote,
            from: { kc: h.from.kc, ti: finiteOrNull(h.from.ti), td: h.from.td },
            to: { kc: h.to.kc, ti: finiteOrNull(h.to.ti), td: h.to.td },
            status: h.run.result.status,
            bump:
              h.run.bump === null
                ? null
                : {
                    at: h.run.bump.at,
                    sample_at: h.run.bump.sampleAt,
                    window_end: h.run.bump.windowEnd,
                    y_before: h.run.bump.yBefore,
                    u_before: h.run.bump.uBefore,
                    u_jump: h.run.bump.uJump,
                    u_peak: h.run.bump.uPeak,
                    y_peak: h.run.bump.yPeak,
                    y_peak_after: h.run.bump.yPeakAfter,
                    y_shift: h.run.bump.yShift,
                  },
          },
    notes: r.notes,
  };
}
