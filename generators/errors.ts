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
  /** What the user should do about it, when that is not plain from `expected`. */
  todo?: string;
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
    return `${parts ? parts + ': ' : ''}${this.message}${tail ? ` (${tail})` : ''}${w.todo ? ` — ${w.todo}` : ''}`;
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

/**
 * Exit codes of `kiln` (the README's verb table lists them). 70 is sysexits.h's EX_SOFTWARE.
 */
export const EXIT = {
  ok: 0,
  /** Findings: a check failed, a build or publish was refused because of them. */
  findings: 1,
  /** Bad input or usage: a content file, a FITS file, an option, a tampered archive. */
  input: 2,
  /** The file system refused: disk full, permission denied, read-only, I/O error. */
  environment: 3,
  /** Another kiln holds the lock, or changed the same directory at the same moment. */
  busy: 4,
  /** A bug in Kiln (one line; the stack trace with --debug). */
  internal: 70,
} as const;

/**
 * A failure of the machine rather than of the input (disk full, permission, a lock held). Same
 * one-line form as an input error, its own exit code.
 */
export class KilnEnvironmentError extends KilnInputError {
  readonly exitCode: number;
  constructor(message: string, where: InputErrorWhere = {}, exitCode: number = EXIT.environment) {
    super(message, where);
    this.name = 'KilnEnvironmentError';
    this.exitCode = exitCode;
  }
}

/** Exit code of a Kiln error: environment failures carry their own, input errors are 2. */
export function exitCodeOf(e: KilnInputError): number {
  return e instanceof KilnEnvironmentError ? e.exitCode : EXIT.input;
}

/** What the system call said, what it means for the user, and what to do; by errno code. */
const ERRNO: Record<string, { message: string; todo: string; exit: number }> = {
  ENOSPC: { message: 'no space left on the device', todo: 'free disk space (or choose another --out) and run the command again', exit: EXIT.environment },
  EDQUOT: { message: 'disk quota exceeded', todo: 'free space within your quota and run the command again', exit: EXIT.environment },
  EACCES: { message: 'permission denied', todo: 'give your user read/write permission on it, or choose another directory', exit: EXIT.environment },
  EPERM: { message: 'operation not permitted', todo: 'give your user permission on it, or choose another directory', exit: EXIT.environment },
  EROFS: { message: 'read-only file system', todo: 'choose a writable directory', exit: EXIT.environment },
  EIO: { message: 'input/output error', todo: 'check the device, then run the command again', exit: EXIT.environment },
  EMFILE: { message: 'too many open files', todo: 'raise the open-file limit (ulimit -n) or use fewer --workers', exit: EXIT.environment },
  ENFILE: { message: 'too many open files in the system', todo: 'close other programs, then run the command again', exit: EXIT.environment },
  ENAMETOOLONG: { message: 'file name too long', todo: 'use a shorter directory or id', exit: EXIT.environment },
  ENOTEMPTY: { message: 'directory changed by another process at the same moment', todo: 'make sure no other kiln writes there, then run the command again', exit: EXIT.busy },
  EEXIST: { message: 'already exists (created by another process at the same moment?)', todo: 'make sure no other kiln writes there, then run the command again', exit: EXIT.busy },
  EBUSY: { message: 'resource busy', todo: 'close what holds it, then run the command again', exit: EXIT.busy },
  ENOENT: { message: 'not found (removed while Kiln was working?)', todo: 'make sure no other program changes the directory, then run the command again', exit: EXIT.environment },
  ENOTDIR: { message: 'a path component is not a directory', todo: 'check the path', exit: EXIT.input },
  EISDIR: { message: 'is a directory, not a file', todo: 'check the path', exit: EXIT.input },
  ELOOP: { message: 'too many symbolic links', todo: 'replace the links by the files themselves', exit: EXIT.input },
};

/** A Node system-call error (it has an errno code and a syscall) as a one-line Kiln error; null otherwise. */
export function fromSystemError(e: unknown): KilnEnvironmentError | null {
  if (!(e instanceof Error)) return null;
  const x = e as NodeJSErrnoLike;
  if (typeof x.code !== 'string' || typeof x.syscall !== 'string') return null;
  const known = ERRNO[x.code];
  const file = x.dest ? `${x.path} → ${x.dest}` : x.path;
  if (!known) return new KilnEnvironmentError(`${x.syscall} failed: ${x.code}`, { file, todo: 'run the command again; report it if it persists' });
  return new KilnEnvironmentError(`${known.message} (${x.syscall}, ${x.code})`, { file, todo: known.todo }, known.exit);
}

interface NodeJSErrnoLike {
  code?: unknown;
  syscall?: unknown;
  path?: string;
  dest?: string;
}

/**
 * A system-call error as the user should read it: paths inside a private staging or temporary
 * folder are shown as the target they stand for, and an error without a path (a write to an open
 * file) names `target`. Returns `e` itself (changed in place) for rethrowing.
 */
export function inTermsOf(e: unknown, target: string, internal: string[] = []): unknown {
  if (!(e instanceof Error)) return e;
  const x = e as NodeJSErrnoLike;
  if (typeof x.code !== 'string' || typeof x.syscall !== 'string') return e;
  const map = (p: string | undefined) => {
    if (p === undefined) return target;
    for (const dir of internal) if (p === dir || p.startsWith(dir + '/')) return target + p.slice(dir.length);
    return p;
  };
  x.path = map(x.path);
  if (x.dest !== undefined) x.dest = map(x.dest);
  return e;
}
