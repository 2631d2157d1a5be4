/** Validation differences: checks whose status or measured value differ, or exist on one side only. */
import type { Check, ValidationReport } from '../../../generators/site-data/types.ts';

export interface CheckDiff {
  id: string;
  product: string | null;
  title: string;
  a: Check | null;
  b: Check | null;
}

/** Products differ in name between releases (ids carry no version), so checks join on id + product. */
const key = (c: Check) => `${c.id}\u0000${c.product ?? ''}`;

export function validationDiff(a: ValidationReport, b: ValidationReport): CheckDiff[] {
  const mb = new Map(b.checks.map((c) => [key(c), c]));
  const ma = new Map(a.checks.map((c) => [key(c), c]));
  const out: CheckDiff[] = [];
  for (const ca of a.checks) {
    const cb = mb.get(key(ca)) ?? null;
    if (!cb || cb.status !== ca.status || cb.measured !== ca.measured) out.push({ id: ca.id, product: ca.product, title: ca.title, a: ca, b: cb });
  }
  for (const cb of b.checks) if (!ma.has(key(cb))) out.push({ id: cb.id, product: cb.product, title: cb.title, a: null, b: cb });
  return out;
}
