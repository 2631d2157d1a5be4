/** SHA-256 helpers for manifests and archive verification (Node layer of the pipeline). */
import { createHash } from 'node:crypto';

export function sha256Hex(bytes: Uint8Array | string): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/**
 * Canonical JSON: object keys sorted, typed arrays as plain arrays, so that a hash over inputs
 * does not depend on key order or on how a loader happened to build the objects.
 */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(normalise(value));
}

function normalise(v: unknown): unknown {
  if (v === null || typeof v !== 'object') return v;
  if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number>);
  if (Array.isArray(v)) return v.map(normalise);
  const out: Record<string, unknown> = {};
  for (const k of Object.keys(v as object).sort()) {
    const x = (v as Record<string, unknown>)[k];
    if (x !== undefined) out[k] = normalise(x);
  }
  return out;
}
