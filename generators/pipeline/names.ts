/** File names and product ids of a release's products. All parts are safe ids (checked by the schema). */
import type { ProductKind } from '../site-data/types.ts';

/** Epoch label of products valid across all of a detector's epochs (the RMF). */
export const ALL_EPOCHS = 'all';

const EXTENSION: Record<ProductKind, string> = { rmf: 'rmf', arf: 'arf', rsp: 'rsp' };

export function productId(detector: string, epoch: string, kind: ProductKind): string {
  return epoch === ALL_EPOCHS ? `${detector}-${kind}` : `${detector}-${epoch}-${kind}`;
}

/** e.g. "quillon-tarncam_fi0_e2_1.1.0.arf.gz": instrument, detector, epoch, release, kind. */
export function productFileName(instrument: string, detector: string, epoch: string, release: string, kind: ProductKind): string {
  const parts = epoch === ALL_EPOCHS ? [instrument, detector, release] : [instrument, detector, epoch, release];
  return `${parts.join('_')}.${EXTENSION[kind]}.gz`;
}
