/**
 * The writer keeps what the user owns: a symbolic link stays a link and its target is written,
 * modes (0600, 0640) and owners stay, a read-only file (0444) is refused, a read-only folder
 * gets an in-place write that says it is not atomic, a deleted file is written anew (and
 * said), and a writer killed at any point leaves the old file or the new one, never a mix.
 */
import { spawn, spawnSync } from 'node:child_process';
import {
  chmodSync,
  chownSync,
  existsSync,
  linkSync,
  lstatSync,
  mkdirSync,
  mkdtempSync,
  readdirSync,
  readFileSync,
  readlinkSync,
  rmSync,
  statSync,
  symlinkSync,
  writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeFileKeeping } from '../../src/cli/write-file.js';
import ts from 'typescript';
import { Rng } from '../../src/num/index.js';
import { fillText } from './helpers/fill-text.js';

const root = resolve(import.meta.dirname, '..', '..');
const tmp = mkdtempSync(join(tmpdir(), 'looprig-writer-'));
// Other users (the read-only-folder child runs as "nobody") must reach the folders inside.
chmodSync(tmp, 0o755);
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

const isRoot = process.getuid?.() === 0;
const NOBODY = 65534;
let dirCount = 0;
function freshDir(): string {
  const d = join(tmp, `d${dirCount++}`);
  mkdirSync(d);
  return d;
}
const mode = (p: string): number => statSync(p).mode & 0o7777;
const temps = (dir: string): string[] => readdirSync(dir).filter((f) => f.endsWith('.tmp'));

describe('writeFileKeeping: links', () => {
  it('writes the target of a symbolic link and keeps the link (was: the link became a plain file)', () => {
    const d = freshDir();
    mkdirSync(join(d, 'real'));
    writeFileSync(join(d, 'real', 'target.yaml'), 'old\n');
    symlinkSync('real/target.yaml', join(d, 'link.yaml'));
    const out = writeFileKeeping(join(d, 'link.yaml'), 'new\n');
    expect(lstatSync(join(d, 'link.yaml')).isSymbolicLink()).toBe(true);
    expect(readlinkSync(join(d, 'link.yaml'))).toBe('real/target.yaml');
    expect(readFileSync(join(d, 'real', 'target.yaml'), 'utf8')).toBe('new\n');
    expect(out.target).toBe(join(d, 'real', 'target.yaml'));
    expect(out.notes.join(' ')).toContain(`through the link ${join(d, 'link.yaml')} to ${join(d, 'real', 'target.yaml')}`);
    expect(temps(d)).toEqual([]);
    expect(temps(join(d, 'real'))).toEqual([]);
  });

  it('a chain of links is followed to the end; a dangling link creates the file it names', () => {
    const d = freshDir();
    writeFileSync(join(d, 'a.yaml'), 'old\n');
    symlinkSync('a.yaml', join(d, 'b.yaml'));
    symlinkSync('b.yaml', join(d, 'c.yaml'));
    writeFileKeeping(join(d, 'c.yaml'), 'new\n');
    expect(readFileSync(join(d, 'a.yaml'), 'utf8')).toBe('new\n');
    expect(lstatSync(join(d, 'c.yaml')).isSymbolicLink()).toBe(true);
    symlinkSync('missing.yaml', join(d, 'dangling.yaml'));
    const out = writeFileKeeping(join(d, 'dangling.yaml'), 'x\n');
    expect(out.created).toBe(true);
    expect(readFileSync(join(d, 'missing.yaml'), 'utf8')).toBe('x\n');
    expect(lstatSync(join(d, 'dangling.yaml')).isSymbolicLink()).toBe(true);
  });

  it('a link loop is an error, not a hang', () => {
    const d = freshDir();
    symlinkSync('y.yaml', join(d, 'x.yaml'));
    symlinkSync('x.yaml', join(d, 'y.yaml'));
    expect(() => writeFileKeeping(join(d, 'x.yaml'), 'z')).toThrow(/symbolic links/);
  });
});

describe('writeFileKeeping: modes and owners', () => {
  for (const m of [0o600, 0o640, 0o755]) {
    it(`mode ${m.toString(8)} is kept (was: 0644 after every save)`, () => {
      const d = freshDir();
      const f = join(d, 'p.yaml');
      writeFileSync(f, 'old\n');
      chmodSync(f, m);
      writeFileKeeping(f, 'new\n');
      expect(mode(f)).toBe(m);
      expect(readFileSync(f, 'utf8')).toBe('new\n');
    });
  }

  it('a read-only file (0444) is refused and left as it was (was: silently replaced, back as 0644)', () => {
    const d = freshDir();
    const f = join(d, 'p.yaml');
    writeFileSync(f, 'old\n');
    chmodSync(f, 0o444);
    expect(() => writeFileKeeping(f, 'new\n')).toThrow(`${f} is read-only (mode 0444); not written`);
    expect(readFileSync(f, 'utf8')).toBe('old\n');
    expect(mode(f)).toBe(0o444);
    expect(temps(d)).toEqual([]);
  });

  it.skipIf(!isRoot)('as root, the owner and group of the file are kept', () => {
    const d = freshDir();
    const f = join(d, 'p.yaml');
    writeFileSync(f, 'old\n');
    chownSync(f, NOBODY, NOBODY);
    chmodSync(f, 0o640);
    writeFileKeeping(f, 'new\n');
    const st = statSync(f);
    expect([st.uid, st.gid, st.mode & 0o7777]).toEqual([NOBODY, NOBODY, 0o640]);
  });

  it('a file with another hard link: written, and the note says the other name keeps the old content', () => {
    const d = freshDir();
    const f = join(d, 'p.yaml');
    writeFileSync(f, 'old\n');
    linkSync(f, join(d, 'copy.yaml'));
    const out = writeFileKeeping(f, 'new\n');
    expect(out.notes).toEqual([`${f} had 1 other hard link(s); they still hold the previous content`]);
    expect(readFileSync(join(d, 'copy.yaml'), 'utf8')).toBe('old\n');
  });

  it('a folder or other non-regular file is refused', () => {
    const d = freshDir();
    mkdirSync(join(d, 'sub.yaml'));
    expect(() => writeFileKeeping(join(d, 'sub.yaml'), 'x')).toThrow('is not a regular file');
  });
});

/**
 * The child and the writer compiled to plain JavaScript in the test's own temporary folder (mode
 * 755): "nobody" must not need to read the clone, which may sit in a folder only root can enter
 * (a clone in `mktemp -d` is 0700).
 */
let userChild: string | null = null;
function childForOtherUser(): string {
  if (userChild !== null) return userChild;
  const dir = join(tmp, 'user-child');
  mkdirSync(dir, { mode: 0o755 });
  const compile = (from: string, to: string, rewrite: (js: string) => string = (js) => js): void => {
    const js = ts.transpileModule(readFileSync(join(root, from), 'utf8'), {
      compilerOptions: { module: ts.ModuleKind.ES2022, target: ts.ScriptTarget.ES2022 },
    }).outputText;
    writeFileSync(join(dir, to), rewrite(js), { mode: 0o644 });
  };
  compile('src/cli/write-file.ts', 'write-file.mjs');
  compile('test/cli/helpers/write-child.ts', 'write-child.mjs', (js) => js.replace('../../../src/cli/write-file.js', './write-file.mjs'));
  userChild = join(dir, 'write-child.mjs');
  return userChild;
}

/** Run the writer in a child (as "nobody" when we are root: root may create files anywhere). */
function writeInChild(target: string, text: string, expectExisting = false): { stdout: string; status: number | null } {
  const src = join(tmp, `text-${dirCount++}.txt`);
  writeFileSync(src, text);
  chmodSync(src, 0o644);
  const args = [childForOtherUser(), target, src, ...(expectExisting ? ['--expect-existing'] : [])];
  const r = spawnSync(process.execPath, args, {
    cwd: tmp,
    encoding: 'utf8',
    ...(isRoot ? { uid: NOBODY, gid: NOBODY, env: { ...process.env, HOME: tmp } } : {}),
  });
  return { stdout: r.stdout, status: r.status };
}

describe('writeFileKeeping: folders and deleted files', () => {
  it('a read-only folder with a writable file: written in place, and said to be not atomic (was: not saved)', () => {
    const d = freshDir();
    const f = join(d, 'p.yaml');
    writeFileSync(f, 'old old old\n');
    if (isRoot) {
      chownSync(d, NOBODY, NOBODY);
      chownSync(f, NOBODY, NOBODY);
    }
    chmodSync(f, 0o644);
    chmodSync(d, 0o555);
    try {
      const r = writeInChild(f, 'new\n');
      expect(r.status).toBe(0);
      const out = JSON.parse(r.stdout.split('\n')[1]) as { inPlace: boolean; notes: string[] };
      expect(out.inPlace).toBe(true);
      expect(out.notes.join(' ')).toMatch(/does not allow new files.*rewritten in place: not atomic/);
      expect(readFileSync(f, 'utf8')).toBe('new\n');
      expect(mode(f)).toBe(0o644);
    } finally {
      chmodSync(d, 0o755);
    }
  });

  it('a read-only folder and no file: a clear error, nothing created', () => {
    const d = freshDir();
    if (isRoot) chownSync(d, NOBODY, NOBODY);
    chmodSync(d, 0o555);
    try {
      const r = writeInChild(join(d, 'new.yaml'), 'x\n');
      expect(r.status).toBe(1);
      expect(r.stdout).toContain('EACCES');
      expect(existsSync(join(d, 'new.yaml'))).toBe(false);
    } finally {
      chmodSync(d, 0o755);
    }
  });

  it('a file deleted since it was read is written anew, and the outcome says so', () => {
    const d = freshDir();
    const f = join(d, 'gone.yaml');
    const out = writeFileKeeping(f, 'new\n', { expectExisting: true });
    expect(out.created).toBe(true);
    expect(out.notes.join(' ')).toContain('no longer existed (deleted since it was read); written anew');
    expect(readFileSync(f, 'utf8')).toBe('new\n');
    // An export (no expectation) creating its file says nothing.
    expect(writeFileKeeping(join(d, 'fresh.csv'), 'x').notes).toEqual([]);
  });

  it('bytes are written as given: a byte-order mark and CRLF stay', () => {
    const d = freshDir();
    const f = join(d, 'b.yaml');
    writeFileKeeping(f, '\uFEFFname: x\r\nkc: 1\r\n');
    expect([...readFileSync(f).subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    expect(readFileSync(f, 'latin1').endsWith('kc: 1\r\n')).toBe(true);
  });
});

describe('writeFileKeeping: killed mid-write', () => {
  // 4 MiB per write: tens of milliseconds with the flush, a window kills can land in.
  const SIZE = 4 * 1024 * 1024;
  const OLD = fillText('old', SIZE);
  const NEW = fillText('new', SIZE);

  /**
   * The child: the writer's own source, compiled by TypeScript to plain JavaScript once, so that
   * each of the 20 children starts as plain node (a tsx start costs ~0.3 s, ~1 s under load).
   */
  function plainChild(): string {
    const dir = join(tmp, 'plain-child');
    mkdirSync(dir);
    const compile = (from: string, to: string): void => {
      const js = ts.transpileModule(readFileSync(join(root, from), 'utf8'), {
        compilerOptions: { module: ts.ModuleKind.ES2022, target: ts.ScriptTarget.ES2022 },
      }).outputText;
      writeFileSync(join(dir, to), js);
    };
    compile('src/cli/write-file.ts', 'write-file.mjs');
    compile('test/cli/helpers/fill-text.ts', 'fill-text.mjs');
    const main = join(dir, 'child.mjs');
    writeFileSync(
      main,
      [
        "import { writeFileKeeping } from './write-file.mjs';",
        "import { fillText } from './fill-text.mjs';",
        'const [target, label, size] = process.argv.slice(2);',
        'const text = fillText(label, Number(size));',
        "process.stdout.write('ready\\n');",
        'writeFileKeeping(target, text);',
        '',
      ].join('\n'),
    );
    return main;
  }

  it('SIGKILL at 20 or more random points: the target is always the whole old or the whole new file', async () => {
    const child0 = plainChild();
    const d = freshDir();
    const f = join(d, 'big.yaml');
    // How long one write takes on this machine now: the kills are spread over twice that.
    const t0 = performance.now();
    writeFileKeeping(join(d, 'probe.yaml'), NEW);
    const writeMs = performance.now() - t0;
    rmSync(join(d, 'probe.yaml'));
    writeFileSync(f, OLD);
    const rng = new Rng(13);
    const seen = { old: 0, new: 0, midWrite: 0 };
    // At least 20 kills, and on until kills have landed before, inside and after a write (each
    // is likely on any machine, but how likely depends on its speed: no fixed count is assumed);
    // at most 200.
    const coverage = (): boolean => seen.old > 0 && seen.new > 0 && seen.midWrite > 0;
    for (let round = 0; round < 200 && (round < 20 || !coverage()); round++) {
      const current = readFileSync(f, 'utf8');
      const next = current === OLD ? 'new' : 'old';
      const child = spawn(process.execPath, [child0, f, next, String(SIZE)], { stdio: ['ignore', 'pipe', 'ignore'] });
      const exited = new Promise<void>((res) => child.once('exit', () => res()));
      await Promise.race([new Promise<void>((res) => child.stdout.once('data', () => res())), exited]);
      // Kill anywhere from at once to after the write could have finished.
      await new Promise((r) => setTimeout(r, rng.nextFloat() * 2 * writeMs));
      child.kill('SIGKILL');
      await exited;
      const after = readFileSync(f, 'utf8');
      const whole = after === OLD ? 'old' : after === NEW ? 'new' : null;
      expect(whole, `round ${round}: the file is neither the old nor the new content (${after.length} chars)`).not.toBeNull();
      seen[whole!]++;
      // A temporary file left behind: this kill landed inside a write, before its rename.
      if (temps(d).length > 0) seen.midWrite++;
    }
    // The kills hit before, inside and after writes (otherwise this test proves nothing).
    expect(seen.old).toBeGreaterThan(0);
    expect(seen.new).toBeGreaterThan(0);
    expect(seen.midWrite).toBeGreaterThan(0);
    // Temporary files of killed writers are removed by the next write.
    writeFileKeeping(f, 'done\n');
    expect(temps(d)).toEqual([]);
    expect(readFileSync(f, 'utf8')).toBe('done\n');
  }, 300_000);

  it("a temporary file of a live writer is not touched by another's cleanup", () => {
    const d = freshDir();
    const f = join(d, 'p.yaml');
    writeFileSync(f, 'old\n');
    // Our own pid is alive: such a file must survive (it could be a write in progress).
    const live = `.p.yaml.${process.ppid}.0123abcd.tmp`;
    writeFileSync(join(d, live), 'partial');
    const dead = spawnSync(process.execPath, ['-e', '0']).pid;
    writeFileSync(join(d, `.p.yaml.${dead}.89abcdef.tmp`), 'partial');
    writeFileKeeping(f, 'new\n');
    expect(temps(d)).toEqual([live]);
  });
});

describe('writeFileKeeping: text in chunks', () => {
  it('writes the chunks in order, byte for byte what the joined text gives, taking each chunk once as it comes', () => {
    const d = freshDir();
    const file = join(d, 'trace.csv');
    writeFileSync(file, 'an older and much longer content than the new one\n'.repeat(100));
    const chunks = ['t,y\n', ...Array.from({ length: 50 }, (_, k) => `${k * 0.5},${Math.sin(k)}\n`), 'é€\n'];
    const taken: number[] = [];
    function* gen() {
      for (let k = 0; k < chunks.length; k++) {
        // Every earlier chunk is already in the (temporary) file when this one is asked for.
        const tmpFile = temps(d)[0];
        taken.push(tmpFile === undefined ? -1 : statSync(join(d, tmpFile)).size);
        yield chunks[k];
      }
    }
    writeFileKeeping(file, gen());
    expect(readFileSync(file, 'utf8')).toBe(chunks.join(''));
    expect(taken).toHaveLength(chunks.length);
    for (let k = 0; k < chunks.length; k++) expect(taken[k]).toBe(Buffer.byteLength(chunks.slice(0, k).join(''), 'utf8'));
    expect(temps(d)).toEqual([]);
  });
});
