/**
 * Checks of the FITS checksum convention (Seaman, Pence & Rots, registered FITS convention):
 * DATASUM is the 32-bit ones'-complement sum of the data unit; CHECKSUM makes the whole HDU sum to
 * negative zero. The sums themselves are computed by the FITS reader (generators/fits/checksum.ts);
 * here they become Check objects.
 */
import { makeCheck } from './make-check.ts';
import type { Check, HduView } from './types.ts';

/**
 * Two checks over all HDUs: "fits.datasum" and "fits.checksum". When no HDU carries the keyword,
 * the check is a warning (integrity not verifiable), never a silent pass.
 */
export function checkChecksums(hdus: readonly HduView[], product: string | null): Check[] {
  const dataBad: string[] = [];
  const sumBad: string[] = [];
  let nData = 0;
  let nSum = 0;
  let firstData: { measured: number; stated: string } | null = null;
  for (const h of hdus) {
    const s = h.sums;
    if (!s) continue;
    const label = `HDU ${h.index}${h.name ? ` (${h.name})` : ''}`;
    if (s.datasum !== 'absent') {
      nData++;
      if (s.datasum === 'bad') {
        dataBad.push(`${label}: DATASUM '${s.storedDatasum ?? ''}', data sums to ${s.dataSum}`);
        firstData ??= { measured: s.dataSum, stated: s.storedDatasum ?? '' };
      }
    }
    if (s.checksum !== 'absent') {
      nSum++;
      if (s.checksum === 'bad') sumBad.push(`${label}: HDU sums to 0x${s.hduSum.toString(16).padStart(8, '0')}`);
    }
  }
  return [
    makeCheck(nData === 0 ? 'warn' : dataBad.length ? 'fail' : 'pass', {
      id: 'fits.datasum',
      title: 'DATASUM matches the data unit',
      product,
      measured: firstData ? firstData.measured : nData ? `${nData} HDU(s) verified` : null,
      tolerance: firstData ? firstData.stated : 'equal',
      message:
        nData === 0
          ? 'no DATASUM keyword: data integrity not verifiable'
          : dataBad.length
            ? `data differ from what DATASUM records: ${dataBad.join('; ')}`
            : `DATASUM verified in ${nData} HDU(s)`,
    }),
    makeCheck(nSum === 0 ? 'warn' : sumBad.length ? 'fail' : 'pass', {
      id: 'fits.checksum',
      title: 'CHECKSUM makes each HDU sum to −0',
      product,
      measured: nSum ? `${nSum - sumBad.length}/${nSum} HDU(s) verified` : null,
      tolerance: '0xffffffff',
      message:
        nSum === 0
          ? 'no CHECKSUM keyword: HDU integrity not verifiable'
          : sumBad.length
            ? `header or data changed after CHECKSUM was written: ${sumBad.join('; ')}`
            : `CHECKSUM verified in ${nSum} HDU(s)`,
    }),
  ];
}
