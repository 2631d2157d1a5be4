/**
 * Value ± uncertainty in the parameter tables: uncertainty to two significant digits, value to the
 * same decimal place (common practice, no source). Expected strings worked out by hand.
 */
import { describe, expect, it } from 'vitest';
import { fmtMeasured } from '../../src/lib/plot/index.ts';

describe('fmtMeasured', () => {
  it('rounds the value to the decimal place of a two-digit uncertainty', () => {
    expect(fmtMeasured(0.11583, 0.002731)).toEqual({ value: '0.1158', uncertainty: '0.0027' });
    expect(fmtMeasured(-0.21794, 0.6612)).toEqual({ value: '−0.22', uncertainty: '0.66' });
    expect(fmtMeasured(9.9514, 2.531)).toEqual({ value: '10.0', uncertainty: '2.5' });
    expect(fmtMeasured(1234.49, 31.2)).toEqual({ value: '1234', uncertainty: '31' });
  });
  it('keeps four significant digits without an uncertainty, and never shows −0', () => {
    expect(fmtMeasured(3.68, null)).toEqual({ value: '3.68', uncertainty: '—' });
    expect(fmtMeasured(-0.0004, 0.02).value).toBe('0.000');
  });
});
