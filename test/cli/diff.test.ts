/**
 * `looprig diff` on a test repository built here (git init in a temporary folder, a commit per
 * change): each side's figures are those `run --json` and `check --json` print for that revision
 * checked out alone; gain, model, requirement changes; a rename; an added file; an invalid new
 * version; the bad inputs (not a repository, unknown revision, absent file, binary and non-UTF-8
 * content, a shallow clone lacking the revision).
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { fakeIo } from './fake-io.js';

const tmp = mkdtempSync(join(tmpdir(), 'looprig-diff-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

function git(cwd: string, ...args: string[]): string {
  return execFileSync('git', args, {
    cwd,
    encoding: 'utf8',
    env: { ...process.env, GIT_AUTHOR_NAME: 't', GIT_AUTHOR_EMAIL: 't@example.invalid', GIT_COMMITTER_NAME: 't', GIT_COMMITTER_EMAIL: 't@example.invalid' },
  });
}

/** A small plant file: PI on a first-order lag with a delay, requirements, uncertainty. */
function plantText(o: { kc?: number; ti?: string; tau?: string; overshoot?: number; worst?: boolean; units?: boolean } = {}): string {
  return `# tank temperature (test plant)
name: Test lag
model:
  type: first_order
  gain: 2
  time_constant: ${o.tau ?? '20 s'}
  delay: 2 s${o.units ? '\n  output_unit: K' : ''}
actuator: { min: -5, max: 5${o.units ? ", unit: '%'" : ''} }
uncertainty:
  gain: [1.6, 2.4]
loop:
  sample_time: 0.5 s
  controller:
    structure: pi
    form: ideal
    kc: ${o.kc ?? 1.5}
    ti: ${o.ti ?? '20 s'}
  trial:
    duration: 200 s
    events:
      - { at: 5 s, setpoint: 1 }
      - { at: 120 s, setpoint: 1.5 }
  requirements:
    overshoot_pct: ${o.overshoot ?? 30}
    settling_time: 100 s
    gain_margin: 1.5${o.worst ? '\n    worst_case: true' : ''}
`;
}

interface Cli {
  code: number;
  out: string;
  err: string;
  io: ReturnType<typeof fakeIo>;
}

async function cli(args: string[]): Promise<Cli> {
  const io = fakeIo();
  const code = await main(args, io);
  return { code, out: io.stdout, err: io.stderr, io };
}

async function diffJson(args: string[]): Promise<{ code: number; doc: any; err: string }> {
  const r = await cli(['diff', ...args, '--json']);
  return { code: r.code, doc: r.out === '' ? null : JSON.parse(r.out), err: r.err };
}

// Each test runs git and several whole commands in-process: a generous bound for a loaded machine.

/** A repository with one commit per entry; returns its folder. */
function repo(name: string, commits: { files: Record<string, string | Uint8Array | null>; mv?: [string, string] }[]): string {
  const dir = join(tmp, name);
  mkdirSync(dir, { recursive: true });
  git(dir, 'init', '-q', '-b', 'main');
  commits.forEach((c, i) => {
    if (c.mv) git(dir, 'mv', c.mv[0], c.mv[1]);
    for (const [f, text] of Object.entries(c.files)) {
      const p = join(dir, f);
      if (text === null) git(dir, 'rm', '-q', f);
      else {
        mkdirSync(join(p, '..'), { recursive: true });
        writeFileSync(p, text);
      }
    }
    git(dir, 'add', '-A');
    git(dir, 'commit', '-q', '-m', `commit ${i + 1}`, '--allow-empty');
  });
  return dir;
}

/** The file as it is at `rev`, alone in a folder, through `run --json` and `check --json`. */
async function runAndCheck(dir: string, rev: string, path: string): Promise<{ run: any; check: any }> {
  const alone = join(tmp, `alone-${Math.random().toString(36).slice(2)}.yaml`);
  writeFileSync(alone, git(dir, 'show', `${rev}:${path}`));
  const run = await cli(['run', alone, '--json']);
  const check = await cli(['check', alone, '--json']);
  return { run: JSON.parse(run.out), check: JSON.parse(check.out).files[0] };
}

describe('diff between two revisions of a test repository', { timeout: 60_000 }, () => {
  let dir = '';
  beforeAll(() => {
    dir = repo('gains', [
      { files: { 'plants/tank.yaml': plantText() } },
      { files: { 'plants/tank.yaml': plantText({ kc: 3 }) } },
      { files: { 'plants/tank.yaml': plantText({ kc: 3, tau: '30 s' }) } },
      { files: { 'plants/tank.yaml': plantText({ kc: 3, tau: '30 s', overshoot: 2 }) } },
    ]);
  });

  it('before and after figures are exactly what run --json and check --json print on each revision', async () => {
    const f = join(dir, 'plants/tank.yaml');
    const { code, doc } = await diffJson([f, '--from', 'HEAD~3', '--to', 'HEAD~2']);
    expect(code).toBe(0);
    for (const [side, rev] of [['before', 'HEAD~3'], ['after', 'HEAD~2']] as const) {
      const { run, check } = await runAndCheck(dir, rev, 'plants/tank.yaml');
      expect(doc.metrics.length).toBeGreaterThan(0);
      for (const m of doc.metrics) {
        expect(m.name in run.metrics, `run --json has ${m.name}`).toBe(true);
        expect(m[side], `${side} ${m.name}`).toBe(run.metrics[m.name]);
      }
      // A step figure of this two-step trial names the step it comes from, as run --json does.
      const settling = doc.metrics.find((m: any) => m.name === 'settling_time').note;
      expect(settling).toContain(`worst step at ${run.metrics.worst_step_at.settling_time} s`);
      expect(doc.requirements.map((r: any) => [r.name, r.case, r[side].measured, r[side].status])).toEqual(
        check.requirements.map((r: any) => [r.name, r.case, r.measured, r.status]),
      );
      expect(doc[side].status).toBe(run.status);
    }
    // gain_margin is a requirement: the margins row and the check row are the same figure.
    const gm = doc.margins.find((m: any) => m.name === 'gain_margin');
    expect(gm.after).toBe(doc.requirements.find((r: any) => r.name === 'gain_margin').after.measured);
    // ...and says where it was read, as the check row does.
    expect(gm.note).toContain(doc.requirements.find((r: any) => r.name === 'gain_margin').after.note);
    expect(gm.note).toMatch(/rad\/s/);
    for (const m of [...doc.metrics, ...doc.margins]) {
      if (m.before !== null && m.after !== null) expect(m.change).toBeCloseTo(m.after - m.before, 12);
    }
  });

  it('a gain change: the field with its form, and the switch rehearsal from the old gains to the new', async () => {
    const r = await cli(['diff', join(dir, 'plants/tank.yaml'), '--from', 'HEAD~3', '--to', 'HEAD~2']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/controller \(pi, ideal form\)\s+loop\.controller\.kc\s+1\.5\s+->\s+3/);
    const { doc } = await diffJson([join(dir, 'plants/tank.yaml'), '--from', 'HEAD~3', '--to', 'HEAD~2']);
    expect(doc.changes).toEqual([{ section: 'controller', path: 'loop.controller.kc', before: '1.5', after: '3' }]);
    expect(doc.rehearsal.ran).toBe(true);
    expect(doc.rehearsal.from.kc).toBe(1.5);
    expect(doc.rehearsal.to.kc).toBe(3);
    // Quiet stretches 5-120 s and 120-200 s: the switch halfway through the longer one.
    expect(doc.rehearsal.bump.at).toBeCloseTo(62.5, 12);
    // Bumpless: the jump is the loop's own drift over one sample, 57 s after the step (~2e-8).
    expect(Math.abs(doc.rehearsal.bump.u_jump)).toBeLessThan(1e-6);
  });

  it('a model-parameter change is listed under model; the gains did not change, so no rehearsal', async () => {
    const { code, doc } = await diffJson([join(dir, 'plants/tank.yaml'), '--from', 'HEAD~2', '--to', 'HEAD~1']);
    expect(code).toBe(0);
    expect(doc.changes).toEqual([{ section: 'model', path: 'model.time_constant', before: '20 s', after: '30 s' }]);
    expect(doc.rehearsal).toEqual({ ran: false, note: 'no switch rehearsal: the controller gains did not change' });
    expect(doc.metrics.find((m: any) => m.name === 'iae').change).not.toBe(0);
  });

  it('a tightened requirement that newly fails: exit 1, marked in text and markdown', async () => {
    const f = join(dir, 'plants/tank.yaml');
    const { code, doc } = await diffJson([f, '--from', 'HEAD~1', '--to', 'HEAD']);
    expect(code).toBe(1);
    expect(doc.changes).toEqual([{ section: 'requirements', path: 'loop.requirements.overshoot_pct', before: '30', after: '2' }]);
    const os = doc.requirements.find((r: any) => r.name === 'overshoot_pct');
    expect([os.before.status, os.after.status, os.change]).toEqual(['pass', 'fail', 'newly fails']);
    expect(doc.newly_failing).toBe(1);
    const md = await cli(['diff', f, '--from', 'HEAD~1', '--to', 'HEAD', '--markdown']);
    expect(md.code).toBe(1);
    expect(md.out).toContain('**1 requirement newly fails**');
    expect(md.out).toMatch(/\| overshoot_pct \| nominal \| <= 30 % -> <= 2 % \| .* pass \| .* FAIL \| \*\*newly fails\*\* \|/);
    const text = await cli(['diff', f, '--from', 'HEAD~1', '--to', 'HEAD']);
    expect(text.out).toMatch(/overshoot_pct .*NEWLY FAILS/);
    // And back: the reverse change newly passes, exit 0.
    const back = await diffJson([f, '--from', 'HEAD', '--to', 'HEAD~1']);
    expect(back.code).toBe(0);
    expect(back.doc.requirements.find((r: any) => r.name === 'overshoot_pct').change).toBe('newly passes');
  });

  it('default: HEAD against the working tree; --svg writes both trials and the rehearsal', async () => {
    const f = join(dir, 'plants/tank.yaml');
    writeFileSync(f, plantText({ kc: 2, tau: '30 s', overshoot: 2 }));
    try {
      const r = await cli(['diff', f, '--svg', join(tmp, 'd.svg')]);
      expect(r.out).toContain(`HEAD:plants/tank.yaml -> ${f}`);
      const svg = r.io.files.get(join(tmp, 'd.svg'))!;
      expect(svg).toMatch(/^<svg|^<\?xml/);
      for (const label of ['process value before', 'process value after', 'controller output before', 'controller output after', 'rehearsal: switch to new gains']) {
        expect(svg).toContain(label);
      }
    } finally {
      git(dir, 'checkout', '-q', '--', 'plants/tank.yaml');
    }
  });

  it("the file's units: a changed field, on the figures in the plant's units and on the plot's axes", async () => {
    const d = repo('units', [{ files: { 'p.yaml': plantText() } }, { files: { 'p.yaml': plantText({ kc: 2, units: true }) } }]);
    const r = await cli(['diff', join(d, 'p.yaml'), '--from', 'HEAD~1', '--to', 'HEAD', '--svg', join(tmp, 'u.svg')]);
    expect(r.out).toMatch(/model\.output_unit/);
    expect(r.out).toMatch(/iae .*K·s/);
    const svg = r.io.files.get(join(tmp, 'u.svg'))!;
    for (const label of ['process value (K)', 'controller output (%)', 'rehearsal: output (K)', 'rehearsal: controller (%)']) expect(svg).toContain(label);
    // A label added where there was none: the same figure, its change shown.
    const added = (await diffJson([join(d, 'p.yaml'), '--from', 'HEAD~1', '--to', 'HEAD'])).doc.metrics.find((m: any) => m.name === 'iae');
    expect([added.before_unit, added.unit, typeof added.change]).toEqual(['', 'K·s', 'number']);
  });

  it('a changed output unit: each side with its own unit, no change computed across them', async () => {
    const d = repo('unit-change', [
      { files: { 'p.yaml': plantText({ units: true }) } },
      { files: { 'p.yaml': plantText({ units: true }).replace('output_unit: K', 'output_unit: degC') } },
    ]);
    const r = await cli(['diff', join(d, 'p.yaml'), '--from', 'HEAD~1', '--to', 'HEAD']);
    expect(r.out).toMatch(/iae +\S+ K·s +\S+ degC·s +unit K·s -> degC·s, no change computed/);
    const { doc } = await diffJson([join(d, 'p.yaml'), '--from', 'HEAD~1', '--to', 'HEAD']);
    const iae = doc.metrics.find((m: any) => m.name === 'iae');
    expect([iae.before_unit, iae.unit, iae.change]).toEqual(['K·s', 'degC·s', null]);
  });

  it('worst case over the uncertainty box appears when the file asks for it', async () => {
    const d = repo('worst', [{ files: { 'p.yaml': plantText() } }, { files: { 'p.yaml': plantText({ kc: 3, worst: true }) } }]);
    const { doc } = await diffJson([join(d, 'p.yaml'), '--from', 'HEAD~1', '--to', 'HEAD']);
    const worst = doc.requirements.filter((r: any) => r.case === 'worst case');
    expect(worst.map((r: any) => r.name)).toEqual(['overshoot_pct', 'settling_time', 'gain_margin']);
    for (const r of worst) expect(r.before).toBeNull();
    const { check } = await runAndCheck(d, 'HEAD', 'p.yaml');
    expect(worst.map((r: any) => r.after.measured)).toEqual(check.requirements.filter((r: any) => r.case === 'worst case').map((r: any) => r.measured));
  });
});

describe('renames, added files, two files', { timeout: 60_000 }, () => {
  it('follows a rename git sees, and --from REV:OLDPATH names the old path', async () => {
    const d = repo('rename', [{ files: { 'old/tank.yaml': plantText() } }, { mv: ['old', 'new'], files: { 'new/tank.yaml': plantText({ kc: 2 }) } }]);
    const f = join(d, 'new/tank.yaml');
    const auto = await diffJson([f, '--from', 'HEAD~1', '--to', 'HEAD']);
    expect(auto.doc.before.exists).toBe(true);
    expect(auto.doc.before.label).toBe('HEAD~1:old/tank.yaml');
    expect(auto.doc.notes).toContain('renamed: old/tank.yaml at HEAD~1 -> new/tank.yaml');
    const explicit = await diffJson([f, '--from', `HEAD~1:${join(d, 'old/tank.yaml')}`, '--to', 'HEAD']);
    expect(explicit.doc.before.label).toBe('HEAD~1:old/tank.yaml');
    expect(explicit.doc.changes).toEqual(auto.doc.changes);
    expect(explicit.doc.changes).toEqual([{ section: 'controller', path: 'loop.controller.kc', before: '1.5', after: '2' }]);
  });

  it('a file added by the change has no before; its failing requirements are new failures', async () => {
    const d = repo('added', [{ files: { 'README.md': 'x\n' } }, { files: { 'tank.yaml': plantText({ overshoot: 0.001 }) } }]);
    const { code, doc } = await diffJson([join(d, 'tank.yaml'), '--from', 'HEAD~1', '--to', 'HEAD']);
    expect(doc.before.exists).toBe(false);
    expect(doc.metrics.every((m: any) => m.before === null && m.change === null)).toBe(true);
    expect(doc.rehearsal.ran).toBe(false);
    expect(doc.notes).toContain('the file is new: it does not exist at HEAD~1');
    expect(doc.requirements.find((r: any) => r.name === 'overshoot_pct').change).toBe('newly fails');
    expect(code).toBe(1);
  });

  it('two files on disk, no git', async () => {
    const a = join(tmp, 'two-a.yaml');
    const b = join(tmp, 'two-b.yaml');
    writeFileSync(a, plantText());
    writeFileSync(b, plantText({ ti: '60 s' }));
    const { code, doc } = await diffJson([a, b]);
    expect(doc.changes).toEqual([{ section: 'controller', path: 'loop.controller.ti', before: '20 s', after: '60 s' }]);
    // The slower integral no longer settles within 2 % before the second step.
    const st = doc.requirements.find((r: any) => r.name === 'settling_time');
    expect([st.before.status, st.after.status, st.after.measured, st.change]).toEqual(['pass', 'fail', null, 'newly fails']);
    expect(code).toBe(1);
  });
});

describe('bad input: one clear line, exit 2', { timeout: 60_000 }, () => {
  let dir = '';
  beforeAll(() => {
    dir = repo('bad', [
      { files: { 'tank.yaml': plantText(), 'blob.yaml': new Uint8Array([0x6e, 0x61, 0x00, 0x01]), 'latin.yaml': new Uint8Array([0x6e, 0x61, 0x6d, 0x65, 0x3a, 0x20, 0xe9, 0x0a]) } },
      { files: { 'tank.yaml': plantText().replace('kc: 1.5', 'kc: [oops') } },
    ]);
  });

  const oneLine = (err: string): void => {
    expect(err.trim().split('\n')).toHaveLength(1);
    expect(err).not.toMatch(/\n\s+at /);
  };

  it('an invalid new version: its diagnostics at REV:PATH:LINE:COL, and the version named', async () => {
    const r = await cli(['diff', join(dir, 'tank.yaml'), '--from', 'HEAD~1', '--to', 'HEAD']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^HEAD:tank\.yaml:\d+:\d+: /m);
    expect(r.err).toContain('looprig: diff: the new version (HEAD:tank.yaml) is not a valid plant file');
    const old = await cli(['diff', join(dir, 'tank.yaml'), '--from', 'HEAD', '--to', 'HEAD~1']);
    expect(old.code).toBe(2);
    expect(old.err).toContain('the old version (HEAD:tank.yaml) is not a valid plant file');
  });

  it('not a git repository', async () => {
    const lone = mkdtempSync(join(tmpdir(), 'looprig-nogit-'));
    try {
      writeFileSync(join(lone, 'p.yaml'), plantText());
      const r = await cli(['diff', join(lone, 'p.yaml')]);
      expect(r.code).toBe(2);
      oneLine(r.err);
      expect(r.err).toContain('is not in a git repository');
    } finally {
      rmSync(lone, { recursive: true, force: true });
    }
  });

  it('an unknown revision', async () => {
    const r = await cli(['diff', join(dir, 'tank.yaml'), '--from', 'no-such-branch']);
    expect(r.code).toBe(2);
    oneLine(r.err);
    expect(r.err).toContain('--from no-such-branch: unknown revision');
  });

  it('a file absent at both revisions', async () => {
    const r = await cli(['diff', join(dir, 'nothing.yaml'), '--from', 'HEAD~1', '--to', 'HEAD']);
    expect(r.code).toBe(2);
    oneLine(r.err);
    expect(r.err).toContain('nothing.yaml does not exist at HEAD');
  });

  it('binary and non-UTF-8 content at a revision', async () => {
    const bin = await cli(['diff', join(dir, 'blob.yaml'), '--from', 'HEAD~1', '--to', 'HEAD']);
    expect(bin.code).toBe(2);
    oneLine(bin.err);
    expect(bin.err).toContain('HEAD:blob.yaml: binary content');
    const latin = await cli(['diff', join(dir, 'latin.yaml'), '--from', 'HEAD~1', '--to', 'HEAD']);
    expect(latin.code).toBe(2);
    oneLine(latin.err);
    expect(latin.err).toContain('diff: HEAD:latin.yaml:1:7: invalid UTF-8 (byte 0xE9)');
  });

  it('a shallow clone lacking the revision says which fetch depth is needed', async () => {
    const src = repo('deep', [1, 2, 3, 4].map((k) => ({ files: { 'tank.yaml': plantText({ kc: k }) } })));
    const shallow = join(tmp, 'shallow');
    git(tmp, 'clone', '-q', '--depth', '1', `file://${src}`, shallow);
    const r = await cli(['diff', join(shallow, 'tank.yaml'), '--from', 'HEAD~2']);
    expect(r.code).toBe(2);
    oneLine(r.err);
    expect(r.err).toContain("has 1 commit of HEAD's history and HEAD~2 needs 3: run 'git fetch --deepen=2'");
    expect(r.err).toContain('fetch-depth: 0');
    const sha = await cli(['diff', join(shallow, 'tank.yaml'), '--from', 'main~3']);
    expect(sha.err).toContain("'git fetch --deepen=3'");
  });

  it('a version over the resource budget is refused before any run, at its LABEL:LINE:COL', async () => {
    const a = join(tmp, 'budget-a.yaml');
    const b = join(tmp, 'budget-b.yaml');
    writeFileSync(a, plantText());
    writeFileSync(b, plantText().replace('duration: 200 s', 'duration: 5e7 s'));
    const r = await cli(['diff', a, b]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(new RegExp(`^${b.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}:\\d+:\\d+: loop\\.trial\\.duration: .*over the limit.*--no-limits`, 'm'));
    expect(r.out).toBe('');
  });

  it('arguments: --from with two files, --json with --markdown, no file', async () => {
    expect((await cli(['diff', 'a.yaml', 'b.yaml', '--from', 'HEAD'])).code).toBe(2);
    expect((await cli(['diff', 'a.yaml', '--json', '--markdown'])).code).toBe(2);
    expect((await cli(['diff'])).code).toBe(2);
    const help = await cli(['diff', '--help']);
    expect(help.code).toBe(0);
    expect(help.out).toContain('looprig diff FILE [--from REV] [--to REV]');
  });
});
