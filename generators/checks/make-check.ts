/** Small constructors so every check module builds Check objects the same way. */
import type { Check, CheckStatus } from './types.ts';

export interface CheckFields {
  id: string;
  title: string;
  product: string | null;
  measured?: number | string | null;
  tolerance?: number | string | null;
  unit?: string | null;
  message: string;
}

export function makeCheck(status: CheckStatus, f: CheckFields): Check {
  return {
    id: f.id,
    title: f.title,
    product: f.product,
    status,
    measured: f.measured ?? null,
    tolerance: f.tolerance ?? null,
    unit: f.unit ?? null,
    message: f.message,
  };
}

/** pass when ok, otherwise `badStatus` (fail by default). */
export function verdict(ok: boolean, f: CheckFields, okMessage: string, badStatus: CheckStatus = 'fail'): Check {
  return makeCheck(ok ? 'pass' : badStatus, { ...f, message: ok ? okMessage : f.message });
}

/** Round for display in messages without hiding the order of magnitude. */
export function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (Number.isSafeInteger(x)) return String(x);
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return String(Number(x.toPrecision(6)));
  return x.toExponential(4);
}
