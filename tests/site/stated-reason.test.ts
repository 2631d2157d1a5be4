/**
 * Check messages with a stated reason are shown with the reason folded away; nothing of the
 * message may be lost or reordered (the page's text is the message, the label reworded only).
 * Messages below are in the form generators/checks/extrapolation.ts and epoch-adequacy.ts write.
 */
import { describe, expect, it } from 'vitest';
import { FOLD_MIN_CHARS, splitStatedReason } from '../../src/lib/checks/stated-reason.ts';

const LONG = 'No line below O K (0.52 keV) is bright and clean enough to fit, and none above Mn Kβ in these runs (invented)';
const join = (m: ReturnType<typeof splitStatedReason>) => m.head + m.label + m.reason + m.tail;

describe('splitStatedReason', () => {
  it('folds a long "; reason stated:" suffix and keeps every character', () => {
    const msg = `fwhm is extrapolated below 0.5249 keV down to 0.2 keV (factor 2.62) by the law; reason stated: ${LONG}`;
    const m = splitStatedReason(msg);
    expect(m).toEqual({ head: 'fwhm is extrapolated below 0.5249 keV down to 0.2 keV (factor 2.62) by the law', label: '; reason stated: ', reason: LONG, tail: '' });
    expect(join(m)).toBe(msg);
  });
  it('closes the parenthesis the reason sits in ("(allowed …, stated by the release: X)")', () => {
    const msg = `transmission at 0.295875 keV changes by up to 24.8 % (allowed 25.0 %, stated by the release: ${LONG}.)`;
    const m = splitStatedReason(msg);
    expect(m.reason).toBe(`${LONG}.`);
    expect(m.tail).toBe(')');
    expect(m.head.endsWith('(allowed 25.0 %')).toBe(true);
    expect(join(m)).toBe(msg);
  });
  it('leaves short reasons and messages without one inline', () => {
    const short = 'x'.repeat(FOLD_MIN_CHARS - 1);
    for (const msg of [`centroid within 1 eV; reason stated: ${short}`, 'largest |row sum + losses − 1| is 2.6e-8', '']) {
      expect(splitStatedReason(msg)).toEqual({ head: msg, label: '', reason: '', tail: '' });
    }
  });
});
