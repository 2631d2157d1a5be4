/**
 * In-memory forms of the OGIP response products (OGIP CAL/GEN/92-002 and 92-002a; spectra per
 * OGIP/92-007). Writers in generators/ogip turn these into FITS; readers turn any conforming FITS
 * file (Kiln's or not) back into them; checks and plots work on these forms only.
 */

/** Header values shared by response products (OGIP mandatory keywords). */
export interface ResponseMeta {
  telescop: string;
  instrume: string;
  detnam?: string;
  filter: string;
  /** "PI" or "PHA". */
  chantype: 'PI' | 'PHA';
  /** Extra keyword/value pairs (Kiln's own: release id, validity and valid range), written in order. */
  extraKeywords?: { keyword: string; value: string | number | boolean; comment?: string }[];
  /** HISTORY lines. */
  history?: string[];
  /** Program and version written as CREATOR (optional; the OGIP writers default to "kiln"). */
  creator?: string;
  /** Observation-independent creation date written as DATE (YYYY-MM-DD), from the input, never the clock. */
  date: string;
}

/** The EBOUNDS table: nominal energy bounds of each channel. */
export interface Ebounds {
  /** Channel numbers, consecutive from firstChannel. */
  firstChannel: number;
  eMinKeV: Float64Array;
  eMaxKeV: Float64Array;
}

/**
 * A redistribution matrix in OGIP grouped form. Row i (energy bin i) has nGrp[i] groups; group g
 * starts at channel fChan and spans nChan channels; `matrix` holds the row's non-zero elements,
 * group after group.
 */
export interface RmfRow {
  fChan: Int32Array;
  nChan: Int32Array;
  matrix: Float32Array;
}

export interface RmfData {
  meta: ResponseMeta;
  /** "REDIST" (redistribution only), "DETECTOR" or "FULL" (with effective area folded in). */
  hduclas3: 'REDIST' | 'DETECTOR' | 'FULL';
  /** Number of channels (DETCHANS). */
  detchans: number;
  /** First channel number (TLMIN of F_CHAN), 0 or 1. */
  firstChannel: number;
  /** Lower threshold on matrix elements used when compressing (LO_THRES). */
  loThres: number;
  energLoKeV: Float64Array;
  energHiKeV: Float64Array;
  rows: RmfRow[];
  ebounds: Ebounds;
}

export interface ArfData {
  meta: ResponseMeta;
  energLoKeV: Float64Array;
  energHiKeV: Float64Array;
  specrespCm2: Float64Array;
}

export interface PhaData {
  meta: ResponseMeta;
  detchans: number;
  firstChannel: number;
  channel: Int32Array;
  /** COUNTS when present, else null. */
  counts: Float64Array | null;
  /** RATE (counts/s) when present, else null. */
  rate: Float64Array | null;
  exposureS: number;
  backscal: number;
  areascal: number;
  respfile: string;
  ancrfile: string;
  poisserr: boolean;
  hduclas2: string;
  hduclas3: string;
}
