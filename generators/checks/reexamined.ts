/**
 * What today's checks find on products published earlier: the results that fail or warn now and
 * did not in the published report (a check that did not exist then, or a worse status), matched
 * by check id and product. Checks that pass now, or are only for review, are not findings.
 */
import type { Check, CheckStatus, ReexaminedCounts, ReexaminedFinding } from '../site-data/types.ts';

/** Severity order: a finding is a status above the published one. */
const RANK: Record<CheckStatus, number> = { pass: 0, accepted: 1, review: 1, warn: 2, fail: 3 };

const keyOf = (c: Pick<Check, 'id' | 'product'>) => `${c.id}\u0000${c.product ?? ''}`;

export function reexaminedFindings(published: readonly Check[], now: readonly Check[]): ReexaminedFinding[] {
  const then = new Map(published.map((c) => [keyOf(c), c.status]));
  return now
    .filter((c) => c.status === 'fail' || c.status === 'warn')
    .map((c) => ({ ...c, publishedStatus: then.get(keyOf(c)) ?? null }))
    .filter((c) => c.publishedStatus === null || RANK[c.publishedStatus] < RANK[c.status])
    .sort((a, b) => RANK[b.status] - RANK[a.status]);
}

export function reexaminedCounts(findings: readonly ReexaminedFinding[], checksRun: number): ReexaminedCounts {
  return { fail: findings.filter((f) => f.status === 'fail').length, warn: findings.filter((f) => f.status === 'warn').length, checks: checksRun };
}
