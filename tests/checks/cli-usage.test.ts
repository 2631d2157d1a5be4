/**
 * Exit codes of `kiln check` (Kiln's CLI contract, generators/cli/main.ts): 2 with a one-line
 * reason naming the file for unreadable input or bad usage, and no report on stdout.
 */
import { mkdtempSync, rmSync, writeFileSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { afterAll, describe, expect, it } from 'vitest';
import { BROKEN, kilnCheck } from './cli-helpers.ts';

const dir = mkdtempSync(join(tmpdir(), 'kiln-check-usage-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('kiln check usage and unreadable files', () => {
  it('no file: exit 2, usage on stderr', () => {
    const r = kilnCheck();
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/missing FILE/);
  });
  it('unknown option: exit 2', () => {
    const r = kilnCheck('--frobnicate', join(BROKEN, 'clean.rmf'));
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/unknown option --frobnicate/);
  });
  it('missing file: exit 2, one line naming the file', () => {
    const p = join(dir, 'nope.rmf');
    const r = kilnCheck(p);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(p);
    expect(r.stdout).toBe('');
  });
  it('not FITS: exit 2, one line naming the file, no stack trace', () => {
    const p = join(dir, 'text.rmf');
    writeFileSync(p, 'hello, this is not FITS\n'.repeat(200));
    const r = kilnCheck(p);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(p);
    expect(r.stderr).not.toMatch(/\bat .*\.ts:\d+/);
  });
  it('a truncated FITS file: exit 2 naming it, even after a good file (no half report)', () => {
    const bytes = readFileSync(join(BROKEN, 'clean.rmf'));
    const p = join(dir, 'cut.rmf');
    writeFileSync(p, bytes.subarray(0, bytes.length - 2880 - 100));
    const r = kilnCheck(join(BROKEN, 'clean.rmf'), p);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(p);
    expect(r.stdout).toBe('');
  });
  it('gzip-compressed product is read (exit 0)', () => {
    const p = join(dir, 'clean.rmf.gz');
    writeFileSync(p, gzipSync(readFileSync(join(BROKEN, 'clean.rmf'))));
    expect(kilnCheck(p).status).toBe(0);
  });
  it('text report has one line per check and a summary line', () => {
    const r = kilnCheck(join(BROKEN, 'clean.arf'));
    const lines = r.stdout.trim().split('\n');
    const checkLines = lines.filter((l) => /^\s+(PASS|FAIL|WARN|REVIEW)\s/.test(l));
    const summary = lines.find((l) => /\d+ checks: \d+ pass, \d+ fail, \d+ warn, \d+ review/.test(l))!;
    expect(summary).toBeDefined();
    expect(Number(summary.trim().split(' ')[0])).toBe(checkLines.length);
  });
});
