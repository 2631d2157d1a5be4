/**
 * Errors in FITS structure. They are input errors (the CLI prints one line and exits 2) and say
 * where the problem sits: file, HDU (index and EXTNAME), card number or byte offset, and what was
 * expected there.
 */
import { KilnInputError } from '../errors.ts';

export interface FitsLocation {
  /** File name as the user gave it (for messages only). */
  fileName?: string;
  /** 0-based HDU index (0 = primary). */
  hdu?: number;
  /** EXTNAME of the HDU when known. */
  hduName?: string;
  /** 1-based card number within the HDU header. */
  card?: number;
  /** Header keyword or column name concerned. */
  keyword?: string;
  /** Byte offset from the start of the file. */
  byteOffset?: number;
  /** The offending value. */
  value?: unknown;
  /** What the standard requires there. */
  expected?: string;
}

/** Context passed down the layers so that every error can name its place. */
export interface FitsContext {
  fileName?: string;
  hdu?: number;
  hduName?: string;
}

export function describeLocation(w: FitsLocation): string {
  const parts: string[] = [];
  if (w.hdu !== undefined) parts.push(`HDU ${w.hdu}${w.hduName ? ` (${w.hduName})` : w.hdu === 0 ? ' (primary)' : ''}`);
  if (w.card !== undefined) parts.push(`card ${w.card}`);
  if (w.keyword) parts.push(w.keyword);
  if (w.byteOffset !== undefined) parts.push(`byte ${w.byteOffset}`);
  return parts.join(', ');
}

export class FitsFormatError extends KilnInputError {
  readonly fits: FitsLocation;
  constructor(message: string, where: FitsLocation = {}) {
    super(message, {
      file: where.fileName,
      field: describeLocation(where) || undefined,
      value: where.value,
      expected: where.expected,
    });
    this.name = 'FitsFormatError';
    this.fits = where;
  }
}

/** Throws a FitsFormatError at `ctx` plus the given details. */
export function fitsFail(ctx: FitsContext | undefined, message: string, where: Omit<FitsLocation, 'fileName' | 'hdu' | 'hduName'> = {}): never {
  throw new FitsFormatError(message, { ...ctx, ...where });
}
