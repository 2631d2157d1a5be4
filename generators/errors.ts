/**
 * Errors caused by the user's input (a file, a field, a value). The CLI prints these as one
 * line and exits 2; anything else is a bug and keeps its stack trace.
 */
export interface InputErrorWhere {
  /** File the bad input came from, as the user named it. */
  file?: string;
  /** Field path, card keyword, column name or 1-based line number. */
  field?: string;
  line?: number;
  /** The offending value, as found. */
  value?: unknown;
  /** What was expected instead (allowed range, format). */
  expected?: string;
}

export class KilnInputError extends Error {
  readonly where: InputErrorWhere;
  constructor(message: string, where: InputErrorWhere = {}) {
    super(message);
    this.name = 'KilnInputError';
    this.where = where;
  }

  /** One line: "file:line: field: message (got V; expected E)". */
  oneLine(): string {
    const w = this.where;
    const loc = [w.file, w.line !== undefined ? String(w.line) : undefined].filter(Boolean).join(':');
    const parts = [loc, w.field].filter(Boolean).join(': ');
    const got = w.value !== undefined ? `got ${formatValue(w.value)}` : '';
    const exp = w.expected ? `expected ${w.expected}` : '';
    const tail = [got, exp].filter(Boolean).join('; ');
    return `${parts ? parts + ': ' : ''}${this.message}${tail ? ` (${tail})` : ''}`;
  }

  /** Every problem, one line each (one for a single error). */
  lines(): string[] {
    return [this.oneLine()];
  }
}

/** Most input problems listed at once; beyond it one line says how many more there are. */
export const MAX_LISTED_INPUT_ERRORS = 50;

/**
 * Several input problems found in one pass (a whole content tree), in the order found. Behaves as
 * its first error (`where`, `message`, `oneLine()`), and `lines()` lists them all.
 */
export class KilnInputErrors extends KilnInputError {
  readonly errors: KilnInputError[];
  constructor(errors: KilnInputError[]) {
    super(errors[0].message, errors[0].where);
    this.name = 'KilnInputError';
    this.errors = errors.flatMap((e) => (e instanceof KilnInputErrors ? e.errors : [e]));
  }

  override lines(): string[] {
    const shown = this.errors.slice(0, MAX_LISTED_INPUT_ERRORS).map((e) => e.oneLine());
    const more = this.errors.length - shown.length;
    if (more > 0) shown.push(`… and ${more} more problem${more === 1 ? '' : 's'} not listed (fix these first)`);
    return shown;
  }
}

/** Throws nothing for no errors, the error itself for one, a KilnInputErrors for several. */
export function throwInputErrors(errors: KilnInputError[]): void {
  const flat = errors.flatMap((e) => (e instanceof KilnInputErrors ? e.errors : [e]));
  if (flat.length === 1) throw flat[0];
  if (flat.length > 1) throw new KilnInputErrors(flat);
}

/** Longest bad value quoted in a message: room for a file size and a full SHA-256 digest. */
const MAX_VALUE_CHARS = 120;

function formatValue(v: unknown): string {
  if (typeof v === 'string') return JSON.stringify(v.length > MAX_VALUE_CHARS ? v.slice(0, MAX_VALUE_CHARS - 3) + '...' : v);
  if (typeof v === 'number' || typeof v === 'boolean' || v === null) return String(v);
  try {
    const s = JSON.stringify(v);
    return s.length > MAX_VALUE_CHARS ? s.slice(0, MAX_VALUE_CHARS - 3) + '...' : s;
  } catch {
    return String(v);
  }
}

export function isInputError(e: unknown): e is KilnInputError {
  return e instanceof KilnInputError;
}
