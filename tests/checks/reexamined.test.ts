/**
 * Findings of a re-examination (generators/checks/reexamined.ts): a result that fails or warns
 * today is a finding when the published report lacks that check for that product, or had it at a
 * milder status (pass < review < warn < fail); matching is by check id and product.
 */
import { describe, expect, it } from 'vitest';
import { reexaminedCounts, reexaminedFindings } from '../../generators/checks/reexamined.ts';
import type { Check, CheckStatus } from '../../generators/site-data/types.ts';

const check = (id: string, product: string | null, status: CheckStatus): Check => ({ id, title: id, product, status, measured: null, tolerance: null, unit: null, message: '' });

describe('re-examination findings', () => {
  const published = [check('a', 'p1', 'pass'), check('b', 'p1', 'warn'), check('c', 'p1', 'fail'), check('d', null, 'review'), check('a', 'p2', 'warn')];
  const now = [
    check('a', 'p1', 'warn'), // worse than published: finding
    check('b', 'p1', 'warn'), // as published: none
    check('c', 'p1', 'warn'), // better than published: none
    check('d', null, 'fail'), // worse: finding
    check('a', 'p2', 'fail'), // worse: finding
    check('e', 'p1', 'warn'), // a newer check: finding, published status null
    check('f', 'p1', 'pass'), // a newer check that passes: none
    check('g', 'p1', 'review'), // only for review: none
    check('a', 'p3', 'fail'), // same id, another product: a newer result
  ];
  const f = reexaminedFindings(published, now);

  it('keeps new and worse fail/warn results only, failures first', () => {
    expect(f.map((x) => `${x.id}/${x.product}:${x.publishedStatus}→${x.status}`)).toEqual([
      'd/null:review→fail',
      'a/p2:warn→fail',
      'a/p3:null→fail',
      'a/p1:pass→warn',
      'e/p1:null→warn',
    ]);
  });

  it('counts the findings by status and the checks run', () => {
    expect(reexaminedCounts(f, now.length)).toEqual({ fail: 3, warn: 2, checks: 9 });
  });

  it('finds nothing when today agrees with the report', () => {
    expect(reexaminedFindings(published, published)).toEqual([]);
  });
});
