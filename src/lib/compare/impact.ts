/**
 * The compare page's impact section as HTML (build-time default pair and the page's script use the
 * same code): each reference source simulated through release B and fitted with B's and A's
 * responses, parameter shifts in σ and band-rate ratios B/A. Numbers come from B's spectral.json
 * when the build computed this pair, or from the page's worker (same engine, same files).
 */
import { esc } from '../escape.ts';
import { fmt4, fmtMeasured } from '../plot/index.ts';
import type { ReleaseSpectral } from '../../../generators/site-data/types.ts';
import type { SourceImpact } from '../../../generators/spectrum/index.ts';

type Sources = Pick<ReleaseSpectral, 'sources' | 'tolerance'>;

const pct = (v: number) => `${fmt4(100 * v)} %`;
const status = (review: boolean) => (review ? '<span class="st st-review">review</span>' : '<span class="st st-pass">within</span>');

export function impactTablesHtml(impact: readonly SourceImpact[], s: Sources, a: string, b: string, how: string): string {
  const title = (id: string) => esc(s.sources.find((x) => x.id === id)?.title ?? id);
  if (!impact.length) return `<p class="muted">No detector of ${esc(b)} has a matrix and an effective area in ${esc(a)} to compare with.</p>`;
  const params = impact.flatMap((im) =>
    im.parameters.map((p, i) => {
      const m = fmtMeasured(p.newer, p.newerError);
      return `<tr${i === 0 ? ' class="group-start"' : ''}><td>${i === 0 ? esc(im.detector) : ''}</td><td>${i === 0 ? title(im.source) : ''}</td><td>${esc(p.name)}${p.unit ? ` (${esc(p.unit)})` : ''}</td><td class="num">${fmt4(p.truth)}</td><td class="num">${m.value} ± ${m.uncertainty}</td><td class="num">${fmt4(p.older)}</td><td class="num">${fmt4(p.shiftSigma)}</td><td>${status(p.review)}</td></tr>`;
    }),
  );
  const bands = impact.flatMap((im) =>
    im.bands.map((x, i) => `<tr${i === 0 ? ' class="group-start"' : ''}><td>${i === 0 ? esc(im.detector) : ''}</td><td>${i === 0 ? title(im.source) : ''}</td><td>${esc(x.name)} ${fmt4(x.loKeV)}–${fmt4(x.hiKeV)} keV</td><td class="num">${fmt4(x.newerRateCps)}</td><td class="num">${fmt4(x.olderRateCps)}</td><td class="num">${fmt4(x.ratio)}</td><td>${status(x.review)}</td></tr>`),
  );
  return [
    `<p>${esc(how)} Each source is simulated once (Poisson, fixed seed) through ${esc(b)} and fitted with ${esc(b)}'s and ${esc(a)}'s responses (C-statistic). A shift beyond ${fmt4(s.tolerance.shiftSigma)}σ of the fit's own error, or a band rate changed by more than ${pct(s.tolerance.rateRatio)}, is marked for review.</p>`,
    `<div class="table-wrap"><table class="data" id="compare-impact-params"><thead><tr><th>Detector</th><th>Source</th><th>Parameter</th><th class="num">Simulated</th><th class="num">Fit, ${esc(b)}</th><th class="num">Fit, ${esc(a)}</th><th class="num">Shift (σ)</th><th>Result</th></tr></thead><tbody>${params.join('')}</tbody></table></div>`,
    `<div class="table-wrap"><table class="data" id="compare-impact-bands"><thead><tr><th>Detector</th><th>Source</th><th>Band</th><th class="num">Rate, ${esc(b)} (counts/s)</th><th class="num">Rate, ${esc(a)} (counts/s)</th><th class="num">Ratio B/A</th><th>Result</th></tr></thead><tbody>${bands.join('')}</tbody></table></div>`,
  ].join('');
}

/** The section for a pair whose impact the build computed (B's spectral.json compares with A). */
export function prebuiltImpactHtml(s: ReleaseSpectral, a: string, b: string, detectors: readonly string[]): string {
  const impact = s.impact.filter((im) => detectors.includes(im.detector));
  return impactTablesHtml(impact, s, a, b, `Computed by the build (release ${b}'s spectral.json).`);
}
