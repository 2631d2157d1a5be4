/**
 * kiln fold | simulate | fit as a user runs them: the simulated PHA opens in astropy with
 * verify('exception') and valid checksums (FITS checksum convention, via astropy), passes
 * `kiln check`, is byte-identical for the same inputs and seed, and fits back; bad input stops
 * with one line naming file, field, value and what was expected, exit 2.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ROOT } from '../checks/cli-helpers.ts';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';
import { ARF_BI1, ARF_FI0, INSTRUMENT, RMF_FI0, SOURCES } from './helpers.ts';

function kiln(...args: string[]) {
  const r = spawnSync(process.execPath, [join(ROOT, 'bin', 'kiln.mjs'), ...args], { cwd: ROOT, encoding: 'utf8' });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

let dir = '';
let rmf = '';
let arf = '';
const source = join(SOURCES, 'bright-line.yaml');

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'kiln-spectrum-'));
  rmf = join(dir, 'fi0.rmf.gz');
  arf = join(dir, 'fi0.arf.gz');
  copyFileSync(RMF_FI0, rmf);
  copyFileSync(ARF_FI0, arf);
});

describe('kiln simulate → PHA', () => {
  it('writes a PHA that astropy verifies, kiln check passes, with the same bytes for the same seed', () => {
    const a = join(dir, 'a.pha');
    const b = join(dir, 'b.pha');
    const r1 = kiln('simulate', '--source', source, '--rmf', rmf, '--arf', arf, '--out', a, '--seed', '5');
    expect(r1.status, r1.stderr).toBe(0);
    expect(kiln('simulate', '--source', source, '--rmf', rmf, '--arf', arf, '--out', b, '--seed', '5').status).toBe(0);
    expect(Buffer.compare(readFileSync(a), readFileSync(b))).toBe(0);
    const c = kiln('check', a);
    expect(c.status, c.stdout).toBe(0);
    expect(c.stdout).toMatch(/0 fail/);
  });

  it.runIf(runAstropyChecks)("astropy: verify('exception'), checksums, SPECTRUM keywords", () => {
    const a = join(dir, 'astropy.pha');
    expect(kiln('simulate', '--source', source, '--rmf', rmf, '--arf', arf, '--out', a).status).toBe(0);
    const code = [
      'import json, sys, warnings',
      'from astropy.io import fits',
      'p = json.load(sys.stdin)',
      'with warnings.catch_warnings():',
      '    warnings.simplefilter("error")',
      '    with fits.open(p, checksum=True) as f:',
      '        f.verify("exception")',
      '        h = f["SPECTRUM"].header',
      '        d = f["SPECTRUM"].data',
      '        print(json.dumps({k: h.get(k) for k in ["HDUCLAS1", "HDUCLAS2", "HDUCLAS3", "EXPOSURE", "POISSERR", "RESPFILE", "ANCRFILE", "DETCHANS", "CHANTYPE"]} | {"n": len(d), "sum": int(d["COUNTS"].sum()), "ck": [bool(x._checksum_valid) and bool(x._datasum_valid) for x in f]}))',
    ].join('\n');
    const h = runPythonJson<Record<string, unknown>>('astropy', code, a);
    expect(h).toMatchObject({ HDUCLAS1: 'SPECTRUM', HDUCLAS2: 'TOTAL', HDUCLAS3: 'COUNT', EXPOSURE: 20000, POISSERR: true, RESPFILE: 'fi0.rmf.gz', ANCRFILE: 'fi0.arf.gz', DETCHANS: 1024, n: 1024 });
    expect(h.ck).toEqual([true, true]);
    expect(h.sum as number).toBeGreaterThan(10000);
  });

  it('kiln fit finds the response through RESPFILE/ANCRFILE and recovers the line within 4σ; --json carries errors', () => {
    const a = join(dir, 'fit.pha');
    expect(kiln('simulate', '--source', source, '--rmf', rmf, '--arf', arf, '--out', a, '--seed', '9').status).toBe(0);
    const r = kiln('fit', a, '--source', source, '--json');
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout) as { converged: boolean; parameters: { name: string; value: number; error: number; free: boolean }[] };
    expect(out.converged).toBe(true);
    const e = out.parameters.find((p) => p.name === 'line.energyKeV')!;
    expect(e.free).toBe(true);
    // Truth of the invented source: 6.1 keV; the energy scale of the demo release is its own, so allow 4σ + 2 eV.
    expect(Math.abs(e.value - 6.1)).toBeLessThan(4 * e.error + 0.002);
  });

  it('kiln fold prints band rates and pile-up from the instrument file', () => {
    const r = kiln('fold', '--source', source, '--rmf', rmf, '--arf', arf, '--instrument', INSTRUMENT, '--json');
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout) as { totalCounts: number; bands: { name: string; counts: number }[]; pileup: { pileupProbability: number; leavesOut: string } };
    expect(out.bands.map((b) => b.name)).toEqual(['soft', 'medium', 'hard']);
    expect(out.pileup.leavesOut).toMatch(/leaves out/);
    expect(out.totalCounts).toBeGreaterThan(out.bands.reduce((s, b) => s + b.counts, 0) * 0.99);
  });
});

describe('bad input: one line, file, field, value, expected; exit 2', () => {
  function badSource(name: string, text: string): string {
    const p = join(dir, name);
    writeFileSync(p, text);
    return p;
  }
  const base = readFileSync(join(SOURCES, 'soft-thermal.yaml'), 'utf8');

  it('a negative temperature', () => {
    const p = badSource('neg-kt.yaml', base.replace('kTKeV: 0.8', 'kTKeV: -0.8'));
    const r = kiln('fold', '--source', p, '--rmf', rmf, '--arf', arf);
    expect(r.status).toBe(2);
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toContain(p);
    expect(lines[0]).toContain('components[0].kTKeV');
    expect(lines[0]).toContain('-0.8');
    expect(lines[0]).toMatch(/expected/);
  });

  it('a negative column', () => {
    const p = badSource('neg-nh.yaml', base.replace('columnCm2: 2.0e20', 'columnCm2: -2.0e20'));
    const r = kiln('fold', '--source', p, '--rmf', rmf, '--arf', arf);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('absorption.columnCm2');
    expect(r.stderr).toContain('-200000000000000000000');
  });

  it('a line outside the response energy range', () => {
    const line = readFileSync(source, 'utf8').replace('energyKeV: 6.1', 'energyKeV: 15.5');
    const p = badSource('far-line.yaml', line);
    const r = kiln('simulate', '--source', p, '--rmf', rmf, '--arf', arf, '--out', join(dir, 'never.pha'));
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain('components[1].energyKeV');
    expect(r.stderr).toContain('15.5');
    expect(r.stderr).toMatch(/expected 0\.2–12 keV/);
  });

  it('a PHA whose channel count differs from the RMF', async () => {
    const { writePha, readPha } = await import('../../generators/ogip/index.ts');
    const { readFitsFile } = await import('../../generators/node/index.ts');
    const good = join(dir, 'good.pha');
    expect(kiln('simulate', '--source', source, '--rmf', rmf, '--arf', arf, '--out', good).status).toBe(0);
    const pha = readPha(readFitsFile(good)).data;
    const n = 512;
    const short = { ...pha, detchans: n, channel: pha.channel.slice(0, n), counts: pha.counts!.slice(0, n) };
    const p = join(dir, 'short.pha');
    writeFileSync(p, writePha(short));
    const r = kiln('fit', p, '--source', source);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(p);
    expect(r.stderr).toContain('DETCHANS');
    expect(r.stderr).toContain('512');
    expect(r.stderr).toContain('1024');
  });

  it('responses of different detectors mixed (Tarn-F matrix, Tarn-B effective area)', () => {
    const r = kiln('fold', '--source', source, '--rmf', rmf, '--arf', ARF_BI1);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(ARF_BI1);
    expect(r.stderr).toContain('DETNAM');
    expect(r.stderr).toContain('BI1');
    expect(r.stderr).toContain('FI0');
  });

  it('RESPFILE pointing outside the spectrum directory is refused', async () => {
    const { writePha, readPha } = await import('../../generators/ogip/index.ts');
    const { readFitsFile } = await import('../../generators/node/index.ts');
    const good = join(dir, 'good2.pha');
    expect(kiln('simulate', '--source', source, '--rmf', rmf, '--arf', arf, '--out', good).status).toBe(0);
    const pha = readPha(readFitsFile(good)).data;
    const p = join(dir, 'escape.pha');
    writeFileSync(p, writePha({ ...pha, respfile: '../../etc/x.rmf' }));
    const r = kiln('fit', p, '--source', source);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('RESPFILE');
  });

  it('every verb has --help', () => {
    for (const v of ['fold', 'simulate', 'fit']) {
      const r = kiln(v, '--help');
      expect(r.status).toBe(0);
      expect(r.stdout).toMatch(/usage: kiln /);
    }
  });
});
