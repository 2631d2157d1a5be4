/**
 * The build's spectral section: for each release, the predicted rates and pile-up of the
 * instrument's reference sources through its responses, and the impact of the change from the
 * release it supersedes (simulate with the newer response, fit with both: generators/spectrum).
 * Differences beyond the instrument's stated tolerances become `review` checks.
 */
import { join } from 'node:path';
import { XRAY_TABLE } from '../physics/data/xray-elements.ts';
import type { XrayTable } from '../physics/data/xray-table-types.ts';
import { interactionSubset } from '../model/document.ts';
import type { Instrument } from '../content/types.ts';
import { makeCheck } from '../checks/make-check.ts';
import { readArf, readRmf } from '../ogip/index.ts';
import { readFitsFile } from '../node/index.ts';
import type { Check, ProductSummary, ReleaseSpectral, SpectralPrediction } from '../site-data/types.ts';
import { ABUNDANCE_TABLES, foldingResponse, impactPairs, PILEUP_LEAVES_OUT, predict, sourceImpact, type FoldingResponse, type ReferenceSource, type SourceImpact } from '../spectrum/index.ts';

export interface ReleaseProducts {
  id: string;
  dir: string;
  products: ProductSummary[];
}

export function referenceSources(ins: Instrument): ReferenceSource[] {
  return (ins.sources ?? []).map((s) => ({
    id: s.doc.id,
    title: s.doc.title,
    exposureS: s.doc.exposureS,
    seed: s.doc.seed,
    columnCm2: s.model.columnCm2,
    abundances: s.model.abundances.name,
    components: s.model.components,
    free: s.free,
    bounds: s.bounds,
  }));
}

function responseOf(rel: ReleaseProducts, rmf: ProductSummary, arf: ProductSummary): FoldingResponse {
  const r = readRmf(readFitsFile(join(rel.dir, rmf.path))).data;
  const a = readArf(readFitsFile(join(rel.dir, arf.path))).data;
  return foldingResponse({ rmf: r, rmfName: rmf.path, arf: a, arfName: arf.path });
}

export function releaseSpectral(ins: Instrument, newer: ReleaseProducts, older: ReleaseProducts | null, log: (line: string) => void = () => {}): ReleaseSpectral | null {
  const sp = ins.spectral;
  if (!sp) return null;
  const sources = referenceSources(ins);
  const predicted: SpectralPrediction[] = [];
  const impact: SourceImpact[] = [];
  for (const pair of impactPairs(newer.products, older ? older.products : null)) {
    const det = pair.detector;
    const { rmf, arf } = pair.newer;
    const resp = responseOf(newer, rmf, arf);
    predicted.push({ detector: det, rmf: rmf.path, arf: arf.path, epoch: arf.epoch, sources: sources.map((s) => predict(resp, s, sp.bands, sp.pileup)) });
    if (!older || !pair.older) continue;
    const oResp = responseOf(older, pair.older.rmf, pair.older.arf);
    for (const s of sources) {
      const t0 = performance.now();
      impact.push(sourceImpact({ detector: det, source: s, newer: resp, older: oResp, bands: sp.bands, tolerance: sp.impact }));
      log(`release ${newer.id}: impact of ${older.id} → ${newer.id} on ${s.id} (${det}) in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
    }
  }
  return {
    schema: 'kiln/release-spectral/1',
    release: newer.id,
    comparedWith: older ? older.id : null,
    bands: sp.bands,
    pileup: { ...sp.pileup, leavesOut: PILEUP_LEAVES_OUT },
    tolerance: sp.impact,
    sources,
    predicted,
    impact,
  };
}

/**
 * The element data the reference sources' absorption uses (the elements of their abundance
 * tables), published beside spectral.json as spectral-elements.json so the compare page's worker
 * can fold and fit any pair with the build's own numbers without bundling the whole table.
 */
export function spectralElements(s: ReleaseSpectral): XrayTable {
  const symbols = new Set<string>();
  for (const src of s.sources) for (const sym of Object.keys(ABUNDANCE_TABLES.find((t) => t.name === src.abundances)?.logEpsilon ?? {})) symbols.add(sym);
  return interactionSubset(XRAY_TABLE, [...symbols]);
}

function num(x: number): string {
  return Math.abs(x) >= 1e-3 && Math.abs(x) < 1e6 ? String(Number(x.toPrecision(5))) : x.toExponential(4);
}

/**
 * The impact as checks of the validation report: `review` beyond the tolerances, `pass` within.
 * Each check's id names its source and parameter or band (`review.impact.<source>.<parameter>`,
 * `review.impact.<source>.band.<band>`), so id + product identify it uniquely: a sign-off in
 * release.yaml accepts one item, and a comparison pairs each with its own counterpart.
 */
export function impactChecks(s: ReleaseSpectral, products: readonly ProductSummary[]): Check[] {
  const out: Check[] = [];
  const label = `${s.comparedWith} → ${s.release}`;
  for (const im of s.impact) {
    const product = products.find((p) => p.kind === 'rmf' && p.detector === im.detector)?.id ?? null;
    for (const p of im.parameters)
      out.push(
        makeCheck(p.review ? 'review' : 'pass', {
          id: `review.impact.${im.source}.${p.name}`,
          title: `Fitted ${p.name} of reference source ${im.source} (${label})`,
          product,
          measured: Number(p.shiftSigma.toPrecision(4)),
          tolerance: s.tolerance.shiftSigma,
          unit: 'σ',
          message: `fit with ${s.comparedWith} gives ${num(p.older)} against ${num(p.newer)} ± ${num(p.newerError)} ${p.unit} with ${s.release}: shift ${num(p.shift)} ${p.unit} (${p.shiftSigma.toFixed(2)} σ)`,
        }),
      );
    for (const b of im.bands)
      out.push(
        makeCheck(b.review ? 'review' : 'pass', {
          id: `review.impact.${im.source}.band.${b.name}`,
          title: `Predicted ${b.name} band rate (${b.loKeV}–${b.hiKeV} keV) of reference source ${im.source} (${label})`,
          product,
          measured: b.ratio === null ? null : Number(b.ratio.toPrecision(6)),
          tolerance: `|ratio − 1| ≤ ${s.tolerance.rateRatio}`,
          unit: 'new/old',
          message: `${num(b.newerRateCps)} counts/s with ${s.release} against ${num(b.olderRateCps)} with ${s.comparedWith}`,
        }),
      );
  }
  return out;
}
