/**
 * kiln compare: per-energy tables and review verdicts. Expected values come from the resolution
 * resolution law (Fano, Phys. Rev. 72, 26 (1947), read noise in quadrature: σ² = (w·N_r)²·n_pix + F·w·E + σ₀², FWHM = 2.3548·σ), computed
 * here independently of generators/physics.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { arfDiffTable, parameterDiffs, rmfDiffTable } from '../../generators/compare/index.ts';
import { buildRedistribution } from '../../generators/response/index.ts';
import { writeArf, writeRmf } from '../../generators/ogip/index.ts';
import type { ArfData } from '../../generators/response/types.ts';
import { CHANNELS, META, gaussianOnlySpec } from '../response/spec-fixtures.ts';

const ENERGY = { minKeV: 0.3, maxKeV: 10, bins: 970, spacing: 'linear' as const };
/** 2·sqrt(2 ln 2), the FWHM of a unit-σ Gaussian (definition). */
const FWHM_PER_SIGMA = 2.354820045;

function lawFwhmEv(eKeV: number, w: number, nr: number, fano: number, npix: number): number {
  return FWHM_PER_SIGMA * Math.sqrt((w * nr) ** 2 * npix + fano * w * eKeV * 1000);
}

function rmfWith(readNoiseE: number) {
  const spec = gaussianOnlySpec({ fwhm: { source: 'law', readNoiseE, fano: 0.118, sigma0Ev: 0, pixelsPerEvent: { a: 1, bPerKeV: 0 } } });
  return buildRedistribution({ spec, lineFits: [], energy: ENERGY, channels: CHANNELS, meta: META }).rmf;
}

function arf(scale: number): ArfData {
  const n = 200;
  const lo = Float64Array.from({ length: n }, (_, i) => 0.3 + i * 0.05);
  const hi = Float64Array.from({ length: n }, (_, i) => 0.35 + i * 0.05);
  return { meta: META, energLoKeV: lo, energHiKeV: hi, specrespCm2: lo.map((e) => scale * 300 * Math.exp(-e / 4)) };
}

describe('comparison tables', () => {
  it('a matrix compared with itself differs by nothing', () => {
    const a = rmfWith(3);
    for (const row of rmfDiffTable(a, a)) {
      expect(row.centroidDiffEv).toBe(0);
      expect(row.fwhmDiffEv).toBe(0);
      expect(row.rowSumDiff).toBe(0);
    }
  });

  // 0.3 eV: the 10 eV energy bins and 12 eV channels bias the fitted widths by < 0.2 eV (largest at
  // 0.5 keV); 1 eV would be 15 % of the 7 eV difference at 8 keV and let a 10 % width error through.
  const DELTA_FWHM_TOL_EV = 0.3;
  // Centroid difference of the two (read noise moves no centroid): measured 4.2e-3 eV at 0.5 keV,
  // < 1e-5 eV above 4 keV; ×10, rounded up (0.3 eV before, 70 times the largest).
  const DELTA_CENTROID_TOL_EV = 0.05;

  it('ΔFWHM between read noise 3 and 6 e⁻ follows the resolution law within 0.3 eV at every probe energy', () => {
    const a = rmfWith(3);
    const b = rmfWith(6);
    const rows = rmfDiffTable(a, b, [0.5, 1, 2, 4, 6, 8]);
    for (const r of rows) {
      const expected = lawFwhmEv(r.energyKeV, 3.65, 6, 0.118, 1) - lawFwhmEv(r.energyKeV, 3.65, 3, 0.118, 1);
      expect(r.fwhmDiffEv).not.toBeNull();
      expect(Math.abs(r.fwhmDiffEv! - expected), `${r.energyKeV} keV`).toBeLessThan(DELTA_FWHM_TOL_EV);
      expect(Math.abs(r.centroidDiffEv!), `${r.energyKeV} keV`).toBeLessThan(DELTA_CENTROID_TOL_EV);
    }
  });

  it('area ratios of a 5 % larger ARF are 1.05', () => {
    for (const r of arfDiffTable(arf(1), arf(1.05))) expect(r.ratio!).toBeCloseTo(1.05, 10);
  });

  it('parameter differences pair rows by detector, group and name and skip unchanged ones', () => {
    const row = (name: string, value: number, uncertainty: number | null) => ({ detector: 'd', group: 'g', name, symbol: null, unit: 'eV', value, uncertainty, source: 'fit' as const });
    const d = parameterDiffs([row('x', 1, 0.3), row('same', 2, null)], [row('x', 1.5, 0.4), row('same', 2, null), row('new', 3, null)]);
    expect(d.map((x) => x.name).sort()).toEqual(['new', 'x']);
    const x = d.find((p) => p.name === 'x')!;
    expect(x.diff).toBeCloseTo(0.5, 12);
    expect(x.sigmas).toBeCloseTo(0.5 / 0.5, 12); // hypot(0.3, 0.4) = 0.5
    expect(d.find((p) => p.name === 'new')!.a).toBeNull();
  });
});

describe('kiln compare (command)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'kiln-compare-'));
  const run = (...args: string[]) => spawnSync('node', ['bin/kiln.mjs', 'compare', ...args], { encoding: 'utf8' });

  it('two files: exit 0 when within tolerances, 1 when the FWHM moved beyond the 3 eV review tolerance', () => {
    writeFileSync(join(dir, 'a.rmf'), writeRmf(rmfWith(3)));
    writeFileSync(join(dir, 'a2.rmf'), writeRmf(rmfWith(3)));
    writeFileSync(join(dir, 'b.rmf'), writeRmf(rmfWith(6)));
    const same = run(join(dir, 'a.rmf'), join(dir, 'a2.rmf'));
    expect(same.status).toBe(0);
    expect(same.stdout).toMatch(/all differences within the review tolerances/);
    const moved = run(join(dir, 'a.rmf'), join(dir, 'b.rmf'), '--json');
    expect(moved.status).toBe(1);
    const report = JSON.parse(moved.stdout);
    expect(report.schema).toBe('kiln/compare/1');
    const fwhm = report.pairs[0].checks.find((c: { id: string }) => c.id === 'review.rmf.fwhm');
    expect(fwhm.status).toBe('review');
  });

  it('an RMF against an ARF is a usage error naming the file (exit 2, one line)', () => {
    writeFileSync(join(dir, 'x.arf'), writeArf(arf(1)));
    writeFileSync(join(dir, 'y.rmf'), writeRmf(rmfWith(3)));
    const r = run(join(dir, 'x.arf'), join(dir, 'y.rmf'));
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/two RMFs or two ARFs/);
  });

  it('two releases of the demo build: every detector paired, parameters listed', () => {
    const out = join(dir, 'out');
    // A private copy of the demo content, so edits to content/ elsewhere cannot move this test.
    const content = join(dir, 'content');
    cpSync(join(import.meta.dirname, '..', '..', 'content'), content, { recursive: true });
    execFileSync('node', ['bin/kiln.mjs', 'build', '--content', content, '--out', out, '--quiet'], { encoding: 'utf8' });
    expect(existsSync(join(out, 'index.json'))).toBe(true);
    const r = run('1.1.0', '2.0.0', '--out', out, '--json');
    expect([0, 1]).toContain(r.status);
    const report = JSON.parse(r.stdout);
    const labels = report.pairs.map((p: { label: string }) => p.label);
    expect(labels).toContain('fi0 RMF');
    expect(labels).toContain('bi1 RMF');
    expect(labels.filter((l: string) => l.includes('ARF')).length).toBeGreaterThanOrEqual(2);
    expect(report.parameters.length).toBeGreaterThan(0);
    const unknown = run('1.1.0', '9.9.9', '--out', out);
    expect(unknown.status).toBe(2);
    expect(unknown.stderr).toMatch(/9\.9\.9/);
  });
});
