/**
 * Numeric checks of a spectrum (OGIP/92-007, memory): channels numbered consecutively from TLMIN
 * with DETCHANS entries (type I file), counts finite and non-negative (rates may be negative in
 * a background-subtracted NET spectrum, so only finiteness is required there), exposure positive.
 */
import type { PhaData } from '../response/types.ts';
import { makeCheck } from './make-check.ts';
import type { Check } from './types.ts';

export function checkPhaNumbers(pha: PhaData, product: string | null): Check[] {
  const n = pha.channel.length;
  let badChan = -1;
  for (let i = 0; i < n && badChan < 0; i++) if (pha.channel[i] !== pha.firstChannel + i) badChan = i;
  const out: Check[] = [
    makeCheck(badChan < 0 && n === pha.detchans ? 'pass' : 'fail', {
      id: 'pha.channels.consecutive',
      title: 'channels consecutive from TLMIN, DETCHANS of them',
      product,
      measured: badChan >= 0 ? `row ${badChan + 1}: channel ${pha.channel[badChan]}` : `${n} rows`,
      tolerance: `${pha.detchans} rows from channel ${pha.firstChannel}`,
      message:
        badChan >= 0
          ? `row ${badChan + 1} has channel ${pha.channel[badChan]}; expected ${pha.firstChannel + badChan}`
          : n === pha.detchans
            ? `${n} channels from ${pha.firstChannel}`
            : `${n} rows but DETCHANS = ${pha.detchans}`,
    }),
  ];
  const data = pha.counts ?? pha.rate;
  const name = pha.counts ? 'COUNTS' : 'RATE';
  if (data) {
    let nonFinite = 0, negative = 0, first = -1;
    data.forEach((v, i) => {
      if (!Number.isFinite(v)) {
        nonFinite++;
        if (first < 0) first = i;
      } else if (v < 0) negative++;
    });
    out.push(
      makeCheck(nonFinite ? 'fail' : 'pass', {
        id: 'pha.data.finite',
        title: `${name} finite`,
        product,
        measured: nonFinite,
        tolerance: 0,
        message: nonFinite ? `${nonFinite} non-finite ${name} value(s), first in row ${first + 1}` : 'all finite',
      }),
    );
    if (pha.counts) {
      out.push(
        makeCheck(negative ? 'fail' : 'pass', {
          id: 'pha.data.nonnegative',
          title: 'COUNTS ≥ 0',
          product,
          measured: negative,
          tolerance: 0,
          message: negative ? `${negative} negative COUNTS value(s)` : 'no negative counts',
        }),
      );
    }
  }
  return out;
}
