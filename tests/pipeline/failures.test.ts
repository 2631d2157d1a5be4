/**
 * The one error path: every verb walked through the failures a user can cause or meet (bad input,
 * a full disk, a read-only disk, no permission, a lock held, hostile files, a tampered archive).
 * Each must end as exactly one line on stderr naming the file, no stack trace ("    at " frames),
 * and the documented exit code (generators/errors.ts EXIT, README verb table): 2 input, 3 file
 * system, 4 busy. A full disk is a real one: a 1 MiB tmpfs (mount(8); the tests run as root in
 * CI). Permission denied is real too: the command runs as user nobody (setpriv(1)), since root
 * bypasses permission bits (POSIX).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { execFileSync } from 'node:child_process';
import { expectOneLine, KILN, kiln, REPO, workspace, type Workspace } from './helpers.ts';

/** Exit codes of the README's verb table. */
const INPUT = 2;
const ENVIRONMENT = 3;
const BUSY = 4;

let ws: Workspace;
let scratch: string;
const PRODUCT = join(REPO, 'content', 'archive', '1.1.0', 'files', 'quillon-tarncam_fi0_1.1.0.rmf.gz');
const AREA = join(REPO, 'content', 'archive', '1.1.0', 'files', 'quillon-tarncam_fi0_e1_1.1.0.arf.gz');
/** The demo's candidate has open review items: publishing it takes a sign-off (README "Review sign-off"). */
const SIGN_OFF = ['--accept-all', '--reason', 'failure test'];

function mountTmpfs(dir: string, size: string, ro = false): void {
  mkdirSync(dir, { recursive: true });
  execFileSync('mount', ['-t', 'tmpfs', '-o', `size=${size}${ro ? ',ro' : ''}`, 'tmpfs', dir]);
}

beforeAll(() => {
  ws = workspace();
  scratch = mkdtempSync(join(tmpdir(), 'kiln-failures-'));
  spawnSync('mkfifo', [join(scratch, 'fifo')]);
  mkdirSync(join(scratch, 'folder.fits'));
});
afterAll(() => {
  for (const m of ['full', 'ro']) spawnSync('umount', [join(scratch, m)]);
  ws.dispose();
  rmSync(scratch, { recursive: true, force: true });
});

/** Runs kiln, expects one line naming `names` and the exit code. */
function fails(args: string[], code: number, names: RegExp, opts: { env?: NodeJS.ProcessEnv } = {}): string {
  const r = opts.env
    ? spawnSync(process.execPath, [KILN, ...args], { cwd: REPO, encoding: 'utf8', env: { ...process.env, ...opts.env }, timeout: 240_000 })
    : kiln(...args);
  const line = expectOneLine(r.stderr);
  expect(r.status, r.stderr).toBe(code);
  expect(line).toMatch(names);
  return line;
}

describe('bad input: one line, exit 2, for every verb', () => {
  it('kiln check / inspect / compare on a FIFO, a folder, a missing file', () => {
    const fifo = join(scratch, 'fifo');
    const dir = join(scratch, 'folder.fits');
    for (const verb of [['check'], ['inspect'], ['compare', PRODUCT]]) {
      fails([...verb, fifo], INPUT, /fifo: not a regular file/);
      fails([...verb, dir], INPUT, /folder\.fits: not a regular file/);
      // compare reads a missing name as a release id; either way the line names it.
      fails([...verb, join(scratch, 'absent.fits')], INPUT, verb[0] === 'compare' ? /absent\.fits/ : /absent\.fits: cannot read file/);
    }
  });

  it('kiln efficiency on a FIFO and a linked instrument file', () => {
    fails(['efficiency', '--instrument', join(scratch, 'fifo'), '--detector', 'fi0', '--energies', '1'], INPUT, /fifo: is a FIFO/);
    const link = join(scratch, 'instrument.yaml');
    symlinkSync(join(ws.content, 'instruments/quillon-tarncam/instrument.yaml'), link);
    fails(['efficiency', '--instrument', link, '--detector', 'fi0', '--energies', '1'], INPUT, /instrument\.yaml: .*symbolic link/);
  });

  it('unknown verb option and bad usage, every verb', () => {
    for (const verb of ['build', 'site', 'plan', 'gather', 'publish', 'report', 'check', 'inspect', 'compare', 'efficiency', 'response', 'fold', 'simulate', 'fit'])
      fails([verb, '--no-such-option'], INPUT, /unknown option --no-such-option/);
  });

  it('kiln fold / simulate / fit / response on a FIFO, a folder, a missing file', () => {
    const fifo = join(scratch, 'fifo');
    const dir = join(scratch, 'folder.fits');
    const source = join(ws.content, 'instruments/quillon-tarncam/sources/bright-line.yaml');
    const spectrum = join(scratch, 'sim.pha');
    fails(['fold', '--source', fifo, '--rmf', PRODUCT], INPUT, /fifo: is a FIFO/);
    fails(['fold', '--source', source, '--rmf', fifo], INPUT, /fifo: not a regular file/);
    fails(['fold', '--source', source, '--rmf', dir], INPUT, /folder\.fits: not a regular file/);
    fails(['simulate', '--source', source, '--rmf', join(scratch, 'absent.rmf'), '--out', spectrum], INPUT, /absent\.rmf: cannot read file/);
    fails(['fit', fifo, '--source', source], INPUT, /fifo: not a regular file/);
    fails(['response', '--release', '2.0.0', '--detector', 'fi0', '--date', '2027-01-01', '--from', join(scratch, 'no-build')], INPUT, /no-build/);
  });

  it('kiln simulate into a full disk, kiln response into a read-only one: exit 3, no partial file', () => {
    const full = join(scratch, 'full');
    mountTmpfs(full, '4k');
    const source = join(ws.content, 'instruments/quillon-tarncam/sources/bright-line.yaml');
    const out = join(full, 'big.pha');
    try {
      const line = fails(['simulate', '--source', source, '--rmf', PRODUCT, '--arf', AREA, '--out', out, '--exposure', '1000'], ENVIRONMENT, /no space left on the device/);
      expect(line).toContain('big.pha');
      expect(readdirSync(full)).toEqual([]);
    } finally {
      spawnSync('umount', [full]);
    }
    const ro = join(scratch, 'ro');
    mountTmpfs(ro, '1m', true);
    const built = join(ws.dir, 'resp-build');
    expect(kiln('build', '--content', ws.content, '--out', built, ...ws.cacheArgs, '--quiet').status).toBe(0);
    try {
      fails(['response', '--release', '2.0.0', '--detector', 'fi0', '--date', '2027-01-01', '--from', built, '--out', join(ro, 'r')], ENVIRONMENT, /read-only file system/);
    } finally {
      spawnSync('umount', [ro]);
    }
  });

  it('kiln build and kiln publish: the same bad input gives the same one line', () => {
    ws.write('releases/2.0.0/notes.md.keep', ws.read('releases/2.0.0/notes.md'));
    rmSync(ws.path('releases/2.0.0/notes.md'));
    spawnSync('mkfifo', [ws.path('releases/2.0.0/notes.md')]);
    for (const verb of [['build', '--out', ws.out], ['publish', '2.0.0']]) fails([...verb, '--content', ws.content], INPUT, /notes\.md: is a FIFO/);
    rmSync(ws.path('releases/2.0.0/notes.md'));
    writeFileSync(ws.path('releases/2.0.0/notes.md'), ws.read('releases/2.0.0/notes.md.keep'));
    rmSync(ws.path('releases/2.0.0/notes.md.keep'));
  });
});

describe('the environment: one line, a documented code, no partial output', () => {
  it('a full disk (1 MiB tmpfs) during kiln build: exit 3 naming --out; nothing left on the disk', () => {
    const full = join(scratch, 'full');
    mountTmpfs(full, '1m');
    const out = join(full, 'out');
    const line = fails(['build', '--content', ws.content, '--out', out, '--quiet'], ENVIRONMENT, /no space left on the device/);
    expect(line).toContain(out);
    expect(line).not.toMatch(/staging/);
    // The staging directory was removed; the lock released.
    expect(readdirSync(full)).toEqual([]);
    spawnSync('umount', [full]);
  });

  it('a full disk during kiln publish (content tree on a nearly full tmpfs): exit 3, release.yaml and archive/ unchanged', () => {
    const full = join(scratch, 'full');
    mountTmpfs(full, '4m');
    const content = join(full, 'content');
    execFileSync('cp', ['-r', ws.content, content]);
    const before = spawnSync('sha256sum', [join(content, 'releases/2.0.0/release.yaml')], { encoding: 'utf8' }).stdout;
    const line = fails(['publish', '2.0.0', '--content', content, ...SIGN_OFF, '--quiet'], ENVIRONMENT, /no space left on the device/);
    expect(line).not.toMatch(/staging/);
    expect(readdirSync(join(content, 'archive')).sort()).toEqual(['1.0.0', '1.1.0']);
    expect(spawnSync('sha256sum', [join(content, 'releases/2.0.0/release.yaml')], { encoding: 'utf8' }).stdout).toBe(before);
    expect(existsSync(join(content, '.archive.lock'))).toBe(false);
    spawnSync('umount', [full]);
  });

  it('a read-only file system for --out: exit 3', () => {
    const ro = join(scratch, 'ro');
    mountTmpfs(ro, '1m', true);
    fails(['build', '--content', ws.content, '--out', join(ro, 'out'), '--quiet'], ENVIRONMENT, /read-only file system/);
    spawnSync('umount', [ro]);
  });

  it('permission denied (run as user nobody): build into a root-owned folder, check a root-only file: exit 3', () => {
    const locked = join(scratch, 'locked');
    mkdirSync(locked, { mode: 0o755 });
    chmodSync(scratch, 0o755);
    const secret = join(scratch, 'secret.rmf.gz');
    writeFileSync(secret, 'x', { mode: 0o600 });
    const asNobody = (args: string[]) =>
      spawnSync('setpriv', ['--reuid=65534', '--regid=65534', '--clear-groups', process.execPath, KILN, ...args], { cwd: REPO, encoding: 'utf8', env: { ...process.env, HOME: scratch }, timeout: 240_000 });
    const r1 = asNobody(['build', '--content', join(REPO, 'content'), '--out', join(locked, 'out'), '--quiet']);
    expect(expectOneLine(r1.stderr)).toMatch(/locked.*permission denied/);
    expect(r1.status).toBe(ENVIRONMENT);
    const r2 = asNobody(['check', secret]);
    expect(expectOneLine(r2.stderr)).toMatch(/secret\.rmf\.gz: permission denied/);
    expect(r2.status).toBe(ENVIRONMENT);
  });

  it('a lock held by a running kiln: build and publish refuse at once with exit 4 naming the lock', async () => {
    // A live process standing in for the other kiln (its pid is alive while the test runs).
    const holder = spawn('sleep', ['60']);
    try {
      const out = join(ws.dir, 'locked-out');
      writeFileSync(join(ws.dir, '.locked-out.lock'), JSON.stringify({ pid: holder.pid, host: (await import('node:os')).hostname(), what: 'kiln build' }));
      fails(['build', '--content', ws.content, '--out', out, '--quiet'], BUSY, /\.locked-out\.lock: kiln build \(pid \d+\) is writing here/);
      writeFileSync(join(ws.content, '.archive.lock'), JSON.stringify({ pid: holder.pid, host: (await import('node:os')).hostname(), what: 'kiln publish' }));
      fails(['publish', '2.0.0', '--content', ws.content, ...ws.cacheArgs, ...SIGN_OFF, '--quiet'], BUSY, /\.archive\.lock: kiln publish \(pid \d+\) is writing here/);
      rmSync(join(ws.content, '.archive.lock'));
    } finally {
      holder.kill('SIGKILL');
    }
  });

  it('two builds into one --out, two publishes of one tree at once: the second refuses with exit 4 while the first runs, the first completes', async () => {
    for (const [args, lock] of [
      [['build', '--content', ws.content, '--out', join(ws.dir, 'both'), '--quiet'], join(ws.dir, '.both.lock')],
      // No cache: each first run must still be working when the second starts.
      [['publish', '2.0.0', '--content', ws.content, ...SIGN_OFF, '--quiet'], join(ws.content, '.archive.lock')],
    ] as const) {
      const first = spawn(process.execPath, [KILN, ...args], { cwd: REPO, stdio: ['ignore', 'pipe', 'pipe'] });
      const done = new Promise<number | null>((ok) => first.on('exit', (c) => ok(c)));
      let firstErr = '';
      first.stderr.on('data', (d) => (firstErr += d));
      for (let i = 0; i < 600 && !existsSync(lock); i++) await new Promise((ok) => setTimeout(ok, 50));
      expect(existsSync(lock), 'the first run took its lock').toBe(true);
      const second = spawnSync(process.execPath, [KILN, ...args], { cwd: REPO, encoding: 'utf8' });
      expect(first.exitCode, 'the first run is still working when the second is refused').toBe(null);
      expect(second.status, second.stderr).toBe(BUSY);
      expect(expectOneLine(second.stderr)).toMatch(/is writing here — wait for it to finish/);
      expect(await done, firstErr).toBe(0);
      expect(existsSync(lock)).toBe(false);
    }
    // Two full builds and two publishes (each with its spectral impact fits), one after the other.
  }, 480_000);

  it('a bug is one line too, with the trace only behind --debug (exit 70)', () => {
    // No user action reaches a bug, so the CLI's failure report is called with an unexpected error.
    const r = spawnSync(process.execPath, ['--import', 'tsx', '-e', "const m = await import('./generators/cli/main.ts'); process.exitCode = m.reportFailure('x', new TypeError('boom'), process.argv.includes('--debug'));", '--', '--debug'], { cwd: REPO, encoding: 'utf8' });
    expect(r.status).toBe(70);
    expect(r.stderr).toMatch(/^kiln x: internal error: TypeError: boom — this is a bug in Kiln/);
    expect(r.stderr).toMatch(/^\s+at /m);
    const q = spawnSync(process.execPath, ['--import', 'tsx', '-e', "const m = await import('./generators/cli/main.ts'); process.exitCode = m.reportFailure('x', new TypeError('boom'), false);"], { cwd: REPO, encoding: 'utf8' });
    expect(q.status).toBe(70);
    expect(expectOneLine(q.stderr)).toMatch(/run again with --debug/);
  });
});
