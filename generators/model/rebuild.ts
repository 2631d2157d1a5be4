/**
 * The build's rebuild check: every product of a detector made again from the model document
 * alone, through the case path `kiln response` and the site's response page use, must have the
 * same bytes as the product the build made. Pure.
 */
import { makeCheck } from '../checks/make-check.ts';
import type { Check } from '../site-data/types.ts';
import type { BuiltFile } from '../pipeline/job.ts';
import { buildCase, type CaseFile } from './case.ts';
import type { ModelDocument } from './types.ts';

export const REBUILD_CHECK_ID = 'model.rebuild.identical';

function sameBytes(a: Uint8Array, b: Uint8Array): number {
  if (a.length !== b.length) return Math.min(a.length, b.length);
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return i;
  return -1;
}

export function rebuildChecks(doc: ModelDocument, modelSha256: string, detector: string, files: readonly BuiltFile[]): Check[] {
  const det = doc.detectors.find((d) => d.id === detector)!;
  const regions = new Map<string, { node: string | null; rowBand: string | null }>();
  for (const f of files) if (f.kind !== 'arf') regions.set(`${f.node ?? ''}/${f.rowBand ?? ''}`, { node: f.node ?? null, rowBand: f.rowBand ?? null });
  if (regions.size === 0) regions.set('/', { node: null, rowBand: null });
  const rebuilt = new Map<string, CaseFile>();
  const rsp = doc.release.products.includes('rsp');
  let first = true;
  for (const reg of regions.values()) {
    const band = reg.rowBand === null ? null : det.regions!.rowBands.find((b) => b.id === reg.rowBand)!;
    det.epochs.forEach((epoch, k) => {
      // The matrix is rebuilt once per region (and per epoch for an RSP); ARFs once per epoch.
      const matrix = k === 0 || rsp;
      if (!matrix && !first) return;
      const c = buildCase(doc, modelSha256, { detector, node: reg.node, row: band ? band.firstTransfer : null, date: epoch.date, energies: { kind: 'model' }, group: 1, rsp, matrix });
      for (const f of c.files) {
        const key = f.kind === 'rmf' ? `rmf/${reg.node}/${reg.rowBand}` : f.kind === 'arf' ? `arf/${epoch.id}` : `rsp/${reg.node}/${reg.rowBand}/${epoch.id}`;
        if (!rebuilt.has(key)) rebuilt.set(key, f);
      }
    });
    first = false;
  }
  return files.map((f) => {
    const key = f.kind === 'rmf' ? `rmf/${f.node ?? null}/${f.rowBand ?? null}` : f.kind === 'arf' ? `arf/${f.epoch}` : `rsp/${f.node ?? null}/${f.rowBand ?? null}/${f.epoch}`;
    const again = rebuilt.get(key);
    const at = again ? sameBytes(f.fits, again.fits) : 0;
    return makeCheck(again && at < 0 ? 'pass' : 'fail', {
      id: REBUILD_CHECK_ID,
      title: 'product rebuilt from the model document alone has identical bytes',
      product: f.id,
      measured: again ? (at < 0 ? 'identical' : `first difference at byte ${at}`) : 'not rebuilt',
      tolerance: 'identical bytes',
      unit: null,
      message: again ? (at < 0 ? `${f.fits.length} bytes identical` : `rebuilt bytes differ from byte ${at} (${f.fits.length} vs ${again.fits.length} bytes)`) : 'the case path made no such product',
    });
  });
}
