/**
 * Review sign-off: a release's `accepted` items (release.yaml) turn matching review checks into
 * `accepted` ones carrying the reason and role; `kiln publish --accept-all --reason TEXT` accepts
 * every remaining one. An accepted item that matches no review check is a warning (a stale or
 * misspelt sign-off), never silently dropped. Pure.
 */
import type { AcceptedItem } from '../content/schema.ts';
import { makeCheck } from '../checks/make-check.ts';
import type { Acceptance, Check } from '../site-data/types.ts';

/** Id of the warning for a sign-off that matches nothing. */
export const UNMATCHED_ACCEPTANCE_ID = 'release.accepted.unmatched';

export interface AcceptAll {
  reason: string;
  role: string;
}

const keyOf = (id: string, product: string | null) => `${id}\u0000${product ?? ''}`;

export function applySignOff(checks: Check[], accepted: readonly AcceptedItem[], all: AcceptAll | null): Check[] {
  const byKey = new Map(accepted.map((a) => [keyOf(a.check, a.product), a]));
  const used = new Set<string>();
  const out = checks.map((c): Check => {
    if (c.status !== 'review') return c;
    const k = keyOf(c.id, c.product);
    const a = byKey.get(k);
    let acceptance: Acceptance | null = null;
    if (a) {
      used.add(k);
      acceptance = { reason: a.reason, role: a.role, source: 'release.yaml' };
    } else if (all) acceptance = { reason: all.reason, role: all.role, source: 'publish --accept-all' };
    return acceptance ? { ...c, status: 'accepted', acceptance } : c;
  });
  for (const a of accepted)
    if (!used.has(keyOf(a.check, a.product)))
      out.push(
        makeCheck('warn', {
          id: UNMATCHED_ACCEPTANCE_ID,
          title: 'accepted review item matches a review check',
          product: a.product,
          measured: a.check,
          message: `release.yaml accepts ${a.check}${a.product ? ` on ${a.product}` : ''}, but this build has no such review item (already within tolerance, or a misspelt id or product)`,
        }),
      );
  return out;
}

/** The sign-off recorded in a seal: every accepted item of the release as published. */
export function signOffOf(checks: readonly Check[]): { check: string; product: string | null; reason: string; role: string; source: Acceptance['source'] }[] {
  return checks.filter((c) => c.status === 'accepted' && c.acceptance).map((c) => ({ check: c.id, product: c.product, ...c.acceptance! }));
}
