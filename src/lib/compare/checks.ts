/** Validation differences: checks whose status or measured value differ, or exist on one side only. */
import type { Check, ValidationReport } from '../../../generators/site-data/types.ts';

export interface CheckDiff {
  id: string;
  product: string | null;
  title: string;
  a: Check | null;
  b: Check | null;
}

/**
 * Products differ in name between releases (ids carry no version), so checks join on id + product;
 * a check id that repeats for one product (one per reference source, say) joins by its order.
 */
function keyed(checks: readonly Check[]): [string, Check][] {
  const seen = new Map<string, number>();
  return checks.map((c) => {
    const k = `${c.id}\u0000${c.product ?? ''}`;
    const n = seen.get(k) ?? 0;
    seen.set(k, n + 1);
    return [`${k}\u0000${n}`, c];
  });
}

export function validationDiff(a: ValidationReport, b: ValidationReport): CheckDiff[] {
  const ka = keyed(a.checks);
  const kb = keyed(b.checks);
  const mb = new Map(kb);
  const ma = new Map(ka);
  const out: CheckDiff[] = [];
  for (const [k, ca] of ka) {
    const cb = mb.get(k) ?? null;
    if (!cb || cb.status !== ca.status || cb.measured !== ca.measured) out.push({ id: ca.id, product: ca.product, title: ca.title, a: ca, b: cb });
  }
  for (const [k, cb] of kb) if (!ma.has(k)) out.push({ id: cb.id, product: cb.product, title: cb.title, a: null, b: cb });
  return out;
}

export interface OneSidedProduct {
  product: string | null;
  checks: Check[];
}

/**
 * The same differences, with the checks of a product that exists in one release only folded into
 * one entry per product (a new epoch's ARF brings some twenty checks, all "absent" on the other side).
 */
export function splitValidationDiff(a: ValidationReport, b: ValidationReport): { both: CheckDiff[]; onlyA: OneSidedProduct[]; onlyB: OneSidedProduct[] } {
  const productsA = new Set(a.checks.map((c) => c.product));
  const productsB = new Set(b.checks.map((c) => c.product));
  const both: CheckDiff[] = [];
  const onlyA = new Map<string | null, Check[]>();
  const onlyB = new Map<string | null, Check[]>();
  const add = (m: Map<string | null, Check[]>, c: Check) => m.set(c.product, [...(m.get(c.product) ?? []), c]);
  for (const d of validationDiff(a, b)) {
    if (d.a && !d.b && !productsB.has(d.product)) add(onlyA, d.a);
    else if (d.b && !d.a && !productsA.has(d.product)) add(onlyB, d.b);
    else both.push(d);
  }
  // A check whose result changed matters more than one whose measured value moved.
  const flipped = (d: CheckDiff) => Number(!!d.a && !!d.b && d.a.status !== d.b.status);
  both.sort((x, y) => flipped(y) - flipped(x));
  const list = (m: Map<string | null, Check[]>) => [...m].map(([product, checks]) => ({ product, checks }));
  return { both, onlyA: list(onlyA), onlyB: list(onlyB) };
}
