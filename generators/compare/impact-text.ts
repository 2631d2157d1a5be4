/** The impact section of `kiln compare --impact` as text (pure). */
import type { ReleaseSpectral } from '../site-data/types.ts';

const num = (x: number): string => (Math.abs(x) >= 1e-3 && Math.abs(x) < 1e6 ? String(Number(x.toPrecision(5))) : x.toExponential(4));

export function formatImpactText(s: ReleaseSpectral): string {
  const out = [
    `Impact on the reference sources: simulated with ${s.release}, fitted with ${s.release} and ${s.comparedWith} (review beyond ${s.tolerance.shiftSigma} σ or a band rate ratio beyond 1 ± ${s.tolerance.rateRatio})`,
  ];
  for (const im of s.impact) {
    out.push(`  ${im.detector} ${im.source} (${im.exposureS} s, ${im.simulatedCounts} counts, seed ${im.seed})`);
    for (const p of im.parameters)
      out.push(`    ${p.review ? 'REVIEW' : 'within'}  ${p.name}: ${num(p.newer)} ± ${num(p.newerError)} with ${s.release}, ${num(p.older)} with ${s.comparedWith}: shift ${num(p.shift)}${p.unit ? ` ${p.unit}` : ''} (${p.shiftSigma.toFixed(2)} σ)`);
    for (const b of im.bands)
      out.push(`    ${b.review ? 'REVIEW' : 'within'}  ${b.name} band ${b.loKeV}–${b.hiKeV} keV: ${num(b.newerRateCps)} counts/s with ${s.release}, ${num(b.olderRateCps)} with ${s.comparedWith} (ratio ${b.ratio === null ? '—' : num(b.ratio)})`);
  }
  if (!s.impact.length) out.push('  no detector has a matrix and an effective area in both releases');
  return out.join('\n');
}
