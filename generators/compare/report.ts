/** The comparison report of `kiln compare`: JSON form and readable text (pure). */
import { reportLine } from '../checks/release-report.ts';
import { plural } from '../plural.ts';
import type { Check } from '../site-data/types.ts';
import type { ParameterDiff } from './parameters.ts';
import type { ArfDiffRow, RmfDiffRow } from './tables.ts';

export interface ComparedPair {
  /** e.g. "fi0 RMF" or "fi0 ARF e1 → e2" or the file names. */
  label: string;
  detector: string | null;
  a: string;
  b: string;
  kind: 'rmf' | 'arf';
  rmf?: RmfDiffRow[];
  arf?: ArfDiffRow[];
  /** Review verdicts against the cross-release tolerances (generators/checks/tolerances.ts). */
  checks: Check[];
}

export interface CompareReport {
  schema: 'kiln/compare/1';
  a: string;
  b: string;
  pairs: ComparedPair[];
  parameters: ParameterDiff[];
  /** Products present in only one side. */
  unmatched: string[];
}

export function needsReview(r: CompareReport): boolean {
  return r.pairs.some((p) => p.checks.some((c) => c.status === 'review' || c.status === 'fail'));
}

const num = (x: number | null, digits: number, width: number): string => (x === null || !Number.isFinite(x) ? '—' : x.toFixed(digits)).padStart(width);
const sig = (x: number | null): string => (x === null || !Number.isFinite(x) ? '—' : Number(x.toPrecision(5)).toString());

export function formatCompareText(r: CompareReport): string {
  const out: string[] = [`comparing ${r.a} (A) with ${r.b} (B)`];
  for (const p of r.pairs) {
    out.push('', `${p.label}: ${p.a} → ${p.b}`);
    if (p.rmf) {
      out.push('  energy keV   centroid A keV   Δcentroid eV   FWHM A eV   ΔFWHM eV   row sum A   Δrow sum');
      for (const x of p.rmf)
        out.push(`  ${num(x.energyKeV, 4, 10)}   ${num(x.centroidAKeV, 5, 14)}   ${num(x.centroidDiffEv, 2, 12)}   ${num(x.fwhmAEv, 2, 9)}   ${num(x.fwhmDiffEv, 2, 8)}   ${num(x.rowSumA, 5, 9)}   ${num(x.rowSumDiff, 5, 8)}`);
    }
    if (p.arf) {
      out.push('  energy keV   area A cm²   area B cm²   ratio B/A');
      for (const x of p.arf) out.push(`  ${num(x.energyKeV, 4, 10)}   ${num(x.areaACm2, 3, 10)}   ${num(x.areaBCm2, 3, 10)}   ${num(x.ratio, 5, 9)}`);
    }
    for (const c of p.checks) out.push(`  ${c.status === 'pass' ? `within tolerance  ${c.id}: ${c.message}` : reportLine(c)}`);
  }
  if (r.parameters.length) {
    out.push('', 'parameter changes (A → B):');
    for (const d of r.parameters)
      out.push(`  ${d.detector ?? '-'}  ${d.group}: ${d.name}: ${sig(d.a)} → ${sig(d.b)}${d.unit ? ' ' + d.unit : ''}${d.diff !== null ? ` (Δ ${sig(d.diff)}${d.sigmas !== null ? `, ${d.sigmas.toFixed(1)}σ` : ''})` : ''}`);
  }
  if (r.unmatched.length) out.push('', `only on one side: ${r.unmatched.join(', ')}`);
  const n = r.pairs.reduce((s, p) => s + p.checks.filter((c) => c.status !== 'pass').length, 0);
  out.push('', n ? `${plural(n, 'difference')} beyond the review tolerances` : 'all differences within the review tolerances');
  return out.join('\n');
}
