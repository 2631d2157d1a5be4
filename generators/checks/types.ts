/**
 * Shapes the checks work on. Checks never touch FITS bytes directly (except checksum.ts): they
 * read a structural view of the file (HDU names, header keyword lookup, column names and units)
 * and the in-memory products of generators/response/types.ts. The view is deliberately minimal so
 * that any FITS reader can be adapted to it (see fits-view.ts).
 */
import type { Check, CheckStatus } from '../site-data/types.ts';

export type { Check, CheckStatus };

/** A keyword → value lookup of one header. Strings come without quotes or trailing blanks. */
export interface HeaderLookup {
  get(keyword: string): string | number | boolean | undefined;
  has(keyword: string): boolean;
}

export interface ColumnView {
  /** TTYPEn, as written (compare case-insensitively). */
  name: string;
  /** TFORMn, e.g. "1E", "1PJ(3)". */
  form: string;
  /** TUNITn, or undefined when absent. */
  unit: string | undefined;
  /** TLMINn / TLMAXn when present. */
  tlmin: number | undefined;
  tlmax: number | undefined;
}

export interface HduView {
  /** 0 for the primary HDU. */
  index: number;
  /** EXTNAME ('' for the primary HDU or an unnamed extension). */
  name: string;
  header: HeaderLookup;
  /** Binary-table columns; empty for images. */
  columns: ColumnView[];
  /** Number of rows (NAXIS2) for tables, 0 otherwise. */
  rows: number;
  /** CHECKSUM/DATASUM state as computed by the FITS reader, when it verified them. */
  sums?: HduSums;
}

/** Result of verifying the FITS checksum convention on one HDU. */
export interface HduSums {
  checksum: 'ok' | 'bad' | 'absent';
  datasum: 'ok' | 'bad' | 'absent';
  /** Ones'-complement sum of the whole HDU (0xFFFFFFFF when CHECKSUM is right). */
  hduSum: number;
  /** Ones'-complement sum of the data unit. */
  dataSum: number;
  storedDatasum?: string;
}

/** What the file looks like to the checks. */
export interface FileView {
  fileName: string;
  hdus: HduView[];
}

/** The product kinds `checkFile` recognises. */
export type CheckedKind = 'rmf' | 'arf' | 'pha' | 'unknown';

/** Per-product context passed to every check: the product id written into each Check. */
export interface CheckContext {
  product: string | null;
}
