/**
 * Numeric checks of a redistribution matrix in memory (RmfData): element values, row sums,
 * energy grid, channel numbering of the groups, and EBOUNDS. The rules are those of OGIP
 * CAL/GEN/92-002/92-002a (memory): channels run from TLMIN(F_CHAN) to TLMIN + DETCHANS − 1;
 * each row's groups give first channel and count; the MATRIX array holds those elements in order.
 */
import type { RmfData } from '../response/types.ts';
import { checkEnergyGrid } from './grid.ts';
import { fmt, makeCheck } from './make-check.ts';
import { ROW_SUM_MAX_EXCESS } from './tolerances.ts';
import type { Check } from './types.ts';

export interface RmfNumberOptions {
  /**
   * Whether row sums are probabilities (≤ 1). False for matrices with the effective area folded in
   * (SPECRESP MATRIX / HDUCLAS3 'FULL'), whose rows are in cm². Default: hduclas3 !== 'FULL'.
   */
  rowsAreProbabilities?: boolean;
  /** The CHANNEL column of EBOUNDS as stored, to check it numbers the channels consecutively. */
  eboundsChannels?: ArrayLike<number>;
}

/** Σ of each row's stored elements. */
export function rowSums(rmf: RmfData): Float64Array {
  const out = new Float64Array(rmf.rows.length);
  rmf.rows.forEach((r, i) => {
    let s = 0;
    for (let k = 0; k < r.matrix.length; k++) s += r.matrix[k];
    out[i] = s;
  });
  return out;
}

export function checkRmfNumbers(rmf: RmfData, product: string | null, opts: RmfNumberOptions = {}): Check[] {
  const out: Check[] = [];
  const probabilities = opts.rowsAreProbabilities ?? rmf.hduclas3 !== 'FULL';
  out.push(...checkEnergyGrid('rmf', rmf.energLoKeV, rmf.energHiKeV, product));

  // Element values.
  let nonFinite = 0;
  let firstNonFinite = -1;
  let negative = 0;
  let minValue = Infinity;
  let minRow = -1;
  rmf.rows.forEach((r, i) => {
    for (let k = 0; k < r.matrix.length; k++) {
      const v = r.matrix[k];
      if (!Number.isFinite(v)) {
        nonFinite++;
        if (firstNonFinite < 0) firstNonFinite = i;
      } else {
        if (v < 0) negative++;
        if (v < minValue) {
          minValue = v;
          minRow = i;
        }
      }
    }
  });
  out.push(
    makeCheck(nonFinite ? 'fail' : 'pass', {
      id: 'rmf.matrix.finite',
      title: 'matrix elements finite',
      product,
      measured: nonFinite,
      tolerance: 0,
      unit: 'elements',
      message: nonFinite ? `${nonFinite} non-finite element(s), first in row ${firstNonFinite}` : 'all elements finite',
    }),
    makeCheck(negative ? 'fail' : 'pass', {
      id: 'rmf.matrix.nonnegative',
      title: 'matrix elements ≥ 0',
      product,
      measured: Number.isFinite(minValue) ? minValue : null,
      tolerance: '≥ 0',
      message: negative ? `${negative} negative element(s); smallest ${fmt(minValue)} in row ${minRow}` : 'no negative element',
    }),
  );

  // Row sums: a photon is detected at most once.
  const sums = rowSums(rmf);
  let maxSum = -Infinity;
  let maxAt = -1;
  for (let i = 0; i < sums.length; i++) {
    if (Number.isFinite(sums[i]) && sums[i] > maxSum) {
      maxSum = sums[i];
      maxAt = i;
    }
  }
  if (probabilities) {
    const ok = !(maxSum > 1 + ROW_SUM_MAX_EXCESS);
    out.push(
      makeCheck(ok ? 'pass' : 'fail', {
        id: 'rmf.rows.sum-le-1',
        title: 'each row sums to at most 1',
        product,
        measured: Number.isFinite(maxSum) ? maxSum : null,
        tolerance: 1 + ROW_SUM_MAX_EXCESS,
        message: ok
          ? `largest row sum ${fmt(maxSum)}`
          : `row ${maxAt} (${fmt(rmf.energLoKeV[maxAt])}–${fmt(rmf.energHiKeV[maxAt])} keV) sums to ${fmt(maxSum)} > 1`,
      }),
    );
  }

  out.push(...checkGroups(rmf, product));
  out.push(...checkEbounds(rmf, product, opts.eboundsChannels));
  return out;
}

/** F_CHAN/N_CHAN of every group inside [TLMIN, TLMIN+DETCHANS−1], ordered, non-overlapping, N_CHAN ≥ 1, and Σ N_CHAN = elements. */
function checkGroups(rmf: RmfData, product: string | null): Check[] {
  const first = rmf.firstChannel;
  const last = rmf.firstChannel + rmf.detchans - 1;
  let outOfRange: string | null = null;
  let outCount = 0;
  let overlap: string | null = null;
  let lengthMismatch: string | null = null;
  rmf.rows.forEach((r, i) => {
    let prevEnd = -Infinity;
    let total = 0;
    for (let g = 0; g < r.fChan.length; g++) {
      const f = r.fChan[g];
      const n = r.nChan[g];
      total += n;
      if (f < first || n < 1 || f + n - 1 > last) {
        outCount++;
        outOfRange ??= `row ${i} group ${g}: F_CHAN ${f}, N_CHAN ${n} (channels ${f}–${f + n - 1})`;
      }
      if (f <= prevEnd) overlap ??= `row ${i} group ${g} starts at channel ${f}, before the previous group ended at ${prevEnd}`;
      prevEnd = f + n - 1;
    }
    if (total !== r.matrix.length) lengthMismatch ??= `row ${i}: Σ N_CHAN = ${total} but MATRIX has ${r.matrix.length} element(s)`;
  });
  return [
    makeCheck(outOfRange ? 'fail' : 'pass', {
      id: 'rmf.channels.range',
      title: 'every group within [TLMIN, TLMIN+DETCHANS−1]',
      product,
      measured: `${outCount} group(s) outside`,
      tolerance: `channels ${first}–${last}`,
      message: outOfRange ? `${outCount} group(s) outside channels ${first}–${last}; first: ${outOfRange}` : `all groups within ${first}–${last}`,
    }),
    makeCheck(overlap ? 'fail' : 'pass', {
      id: 'rmf.channels.groups-ordered',
      title: 'groups of a row ordered and non-overlapping',
      product,
      message: overlap ?? 'groups ordered, no overlap',
    }),
    makeCheck(lengthMismatch ? 'fail' : 'pass', {
      id: 'rmf.channels.group-lengths',
      title: 'Σ N_CHAN equals the number of MATRIX elements',
      product,
      message: lengthMismatch ?? 'group lengths match the stored elements',
    }),
  ];
}

/** EBOUNDS: one row per channel, finite, E_MIN < E_MAX, increasing; same first channel as the matrix. */
function checkEbounds(rmf: RmfData, product: string | null, channels?: ArrayLike<number>): Check[] {
  const { eMinKeV, eMaxKeV, firstChannel } = rmf.ebounds;
  const n = eMinKeV.length;
  let badChannel = -1;
  if (channels) for (let i = 0; i < channels.length && badChannel < 0; i++) if (channels[i] !== rmf.firstChannel + i) badChannel = i;
  const countOk = n === rmf.detchans && eMaxKeV.length === n && firstChannel === rmf.firstChannel && badChannel < 0;
  let bad = -1;
  let why = '';
  for (let i = 0; i < n && bad < 0; i++) {
    if (!Number.isFinite(eMinKeV[i]) || !Number.isFinite(eMaxKeV[i])) [bad, why] = [i, 'not finite'];
    else if (eMinKeV[i] < 0) [bad, why] = [i, `E_MIN ${fmt(eMinKeV[i])} < 0`];
    else if (!(eMaxKeV[i] > eMinKeV[i])) [bad, why] = [i, `E_MAX ${fmt(eMaxKeV[i])} ≤ E_MIN ${fmt(eMinKeV[i])}`];
    else if (i > 0 && !(eMinKeV[i] > eMinKeV[i - 1])) [bad, why] = [i, `E_MIN ${fmt(eMinKeV[i])} ≤ previous ${fmt(eMinKeV[i - 1])}`];
  }
  return [
    makeCheck(countOk ? 'pass' : 'fail', {
      id: 'rmf.ebounds.channels',
      title: 'EBOUNDS covers exactly the matrix channels',
      product,
      measured: `${n} rows from channel ${firstChannel}`,
      tolerance: `${rmf.detchans} rows from channel ${rmf.firstChannel}`,
      message: countOk
        ? `${n} channels from ${firstChannel}`
        : badChannel >= 0
          ? `EBOUNDS row ${badChannel + 1} has CHANNEL ${channels![badChannel]}; expected ${rmf.firstChannel + badChannel} (consecutive from TLMIN of F_CHAN)`
          : `EBOUNDS has ${n} rows starting at channel ${firstChannel}; the matrix has DETCHANS ${rmf.detchans} from channel ${rmf.firstChannel}`,
    }),
    makeCheck(bad < 0 && n > 0 ? 'pass' : 'fail', {
      id: 'rmf.ebounds.monotonic',
      title: 'EBOUNDS finite and increasing',
      product,
      measured: bad < 0 ? null : `channel ${firstChannel + bad}`,
      message: n === 0 ? 'no EBOUNDS rows to check' : bad < 0 ? `${fmt(eMinKeV[0])}–${fmt(eMaxKeV[n - 1])} keV, increasing` : `channel ${firstChannel + bad}: ${why}`,
    }),
  ];
}
