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
