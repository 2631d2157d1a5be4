/**
 * Review sign-off rules (generators/pipeline/sign-off.ts) and the release report's order and
 * wording (generators/checks/release-report.ts), on hand-made checks: an accepted item turns
 * exactly its review check (same id and product) into `accepted`, nothing else; a sign-off that
 * matches nothing is a warning; --accept-all takes every review item release.yaml leaves open.
 */
import { describe, expect, it } from 'vitest';
import { formatReleaseReport, reportLine, sortForReport } from '../../generators/checks/index.ts';
import type { Check } from '../../generators/site-data/types.ts';
import { applySignOff, signOffOf, UNMATCHED_ACCEPTANCE_ID } from '../../generators/pipeline/sign-off.ts';

const check = (id: string, product: string | null, status: Check['status'], measured: number | null = null, tolerance: number | null = null): Check => ({
  id,
  title: id,
  product,
  status,
  measured,
  tolerance,
  unit: measured === null ? null : 'eV',
  message: `${id} on ${product ?? 'release'}`,
});

const CHECKS = [
  check('rmf.rows.sum-le-1', 'fi0-rmf', 'pass'),
  check('review.rmf.fwhm', 'bi1-rmf', 'review', 4.8, 3),
  check('review.rmf.fwhm', 'fi0-rmf', 'review', 3.5, 3),
  check('review.arf.area-ratio', 'bi1-e4-arf', 'review'),
  check('closure.fwhm.mn-ka', 'fi0-rmf', 'fail', -59.8, 2),
];
const ITEM = { check: 'review.rmf.fwhm', product: 'bi1-rmf', reason: 'planned noise increase', role: 'instrument scientist' };

describe('review sign-off', () => {
  it('accepts exactly the listed review item (id and product), keeping its numbers', () => {
    const out = applySignOff(CHECKS, [ITEM], null);
    expect(out.map((c) => c.status)).toEqual(['pass', 'accepted', 'review', 'review', 'fail']);
    expect(out[1]).toEqual({ ...CHECKS[1], status: 'accepted', acceptance: { reason: ITEM.reason, role: ITEM.role, source: 'release.yaml' } });
    expect(signOffOf(out)).toEqual([{ ...ITEM, source: 'release.yaml' }]);
  });

  it('never accepts a failure or a pass, even when listed', () => {
    const out = applySignOff(CHECKS, [{ ...ITEM, check: 'closure.fwhm.mn-ka', product: 'fi0-rmf' }], { reason: 'all', role: 'lead' });
    expect(out[4].status).toBe('fail');
    // The listed failure matched no review item: a warning says so.
    expect(out.filter((c) => c.id === UNMATCHED_ACCEPTANCE_ID)).toHaveLength(1);
  });

  it('a sign-off that matches no review item is a warning naming it, not silently dropped', () => {
    const out = applySignOff(CHECKS, [{ ...ITEM, product: 'bi9-rmf' }], null);
    const w = out.filter((c) => c.id === UNMATCHED_ACCEPTANCE_ID);
    expect(w).toHaveLength(1);
    expect(w[0].status).toBe('warn');
    expect(w[0].message).toMatch(/review\.rmf\.fwhm on bi9-rmf/);
    expect(out.filter((c) => c.status === 'accepted')).toHaveLength(0);
  });

  it('--accept-all takes every open review item with its reason and role; release.yaml items keep theirs', () => {
    const out = applySignOff(CHECKS, [ITEM], { reason: 'contamination growth expected', role: 'calibration lead' });
    expect(out.filter((c) => c.status === 'review')).toHaveLength(0);
    expect(signOffOf(out)).toEqual([
      { ...ITEM, source: 'release.yaml' },
      { check: 'review.rmf.fwhm', product: 'fi0-rmf', reason: 'contamination growth expected', role: 'calibration lead', source: 'publish --accept-all' },
      { check: 'review.arf.area-ratio', product: 'bi1-e4-arf', reason: 'contamination growth expected', role: 'calibration lead', source: 'publish --accept-all' },
    ]);
  });
});

describe('release report', () => {
  it('lists failed, then review, warn, accepted, pass; stable within a status', () => {
    const out = applySignOff(CHECKS, [ITEM], null);
    expect(sortForReport(out).map((c) => `${c.status} ${c.product}`)).toEqual([
      'fail fi0-rmf',
      'review fi0-rmf',
      'review bi1-e4-arf',
      'accepted bi1-rmf',
      'pass fi0-rmf',
    ]);
  });

  it('each line gives measured against allowed, and who accepted it', () => {
    expect(reportLine(CHECKS[4])).toBe('FAIL     closure.fwhm.mn-ka [fi0-rmf]  measured -59.8 eV, allowed 2 eV: closure.fwhm.mn-ka on fi0-rmf');
    const [accepted] = applySignOff([CHECKS[1]], [ITEM], null);
    expect(reportLine(accepted)).toBe('ACCEPTED review.rmf.fwhm [bi1-rmf]  measured 4.8 eV, allowed 3 eV: review.rmf.fwhm on bi1-rmf — accepted by instrument scientist: planned noise increase');
  });

  it('passes are counted, not listed, unless asked; the summary counts every status', () => {
    const out = applySignOff(CHECKS, [ITEM], null);
    const text = formatReleaseReport('release 9.9.9', out);
    expect(text.split('\n')).toHaveLength(1 + 4 + 1);
    expect(text).not.toMatch(/^ {2}PASS/m);
    expect(text.split('\n').at(-1)).toBe('  5 checks: 1 pass, 1 fail, 0 warn, 2 review, 1 accepted');
    expect(formatReleaseReport('r', out, { passing: true })).toMatch(/^ {2}PASS {5}rmf\.rows\.sum-le-1/m);
    expect(formatReleaseReport('r', out, { only: ['fail'] }).split('\n')).toHaveLength(3);
  });
});
