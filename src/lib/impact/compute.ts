/**
 * The impact of a change for any pair of releases, computed in the reader's browser from the two
 * releases' published files (the compare page's worker loads this module on demand): the same
 * pairing (generators/spectrum/pairing.ts), folding, simulation and fits as the build, so for a
 * pair the build computed the numbers are the build's, bit for bit.
 */
import { readFits } from '../../../generators/fits/index.ts';
import { readArf, readRmf } from '../../../generators/ogip/index.ts';
import { foldingResponse, impactPairs, sourceImpact, type FoldingResponse, type SourceImpact } from '../../../generators/spectrum/index.ts';
import type { ProductSummary, ReleaseSpectral } from '../../../generators/site-data/types.ts';
import { maybeGunzip } from '../inspect/gunzip.ts';
import { fetchBytes, productUrl } from '../published-row/read.ts';

export interface ImpactSide {
  id: string;
  products: ProductSummary[];
}

export interface ImpactRequest {
  /** The newer release (B on the compare page) and the older one (A, the reference). */
  newer: ImpactSide;
  older: ImpactSide;
  /** Sources, bands and tolerances: the newer release's spectral section. */
  spectral: Pick<ReleaseSpectral, 'sources' | 'bands' | 'tolerance'>;
  detectors: string[];
}

export type Progress = (done: number, total: number, phase: string) => void;

async function responseOf(release: string, rmf: ProductSummary, arf: ProductSummary): Promise<FoldingResponse> {
  const [rb, ab] = await Promise.all([fetchBytes(productUrl(release, rmf)), fetchBytes(productUrl(release, arf))]);
  const r = readRmf(readFits(await maybeGunzip(rb), { fileName: rmf.path })).data;
  const a = readArf(readFits(await maybeGunzip(ab), { fileName: arf.path })).data;
  return foldingResponse({ rmf: r, rmfName: rmf.path, arf: a, arfName: arf.path });
}

export async function computeImpact(req: ImpactRequest, progress: Progress): Promise<SourceImpact[]> {
  const pairs = impactPairs(req.newer.products, req.older.products, req.detectors).filter((p) => p.older);
  const total = pairs.length * req.spectral.sources.length;
  const out: SourceImpact[] = [];
  let done = 0;
  for (const p of pairs) {
    progress(done, total, `reading the ${p.detector} files`);
    const newer = await responseOf(req.newer.id, p.newer.rmf, p.newer.arf);
    const older = await responseOf(req.older.id, p.older!.rmf, p.older!.arf);
    for (const s of req.spectral.sources) {
      progress(done, total, `${p.detector}: simulating and fitting ${s.id}`);
      out.push(sourceImpact({ detector: p.detector, source: s, newer, older, bands: req.spectral.bands, tolerance: req.spectral.tolerance }));
      done++;
    }
  }
  progress(done, total, 'done');
  return out;
}
