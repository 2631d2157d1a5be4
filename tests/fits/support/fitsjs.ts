/**
 * Loading fitsjs 0.6.6 in Node. fitsjs reads from a URL (XMLHttpRequest) or a Blob (FileReader);
 * Node 20 has Blob and File but no FileReader, so a minimal FileReader is installed here, and
 * a Promise wrapper turns its callbacks into values.
 */
import { createRequire } from 'node:module';

/** The part of the browser FileReader fitsjs uses: readAsArrayBuffer + onloadend + result. */
class MinimalFileReader {
  result: ArrayBuffer | null = null;
  onloadend: ((e: { target: MinimalFileReader }) => void) | null = null;
  onerror: ((e: unknown) => void) | null = null;
  [extra: string]: unknown;
  readAsArrayBuffer(blob: Blob): void {
    blob.arrayBuffer().then(
      (buf) => {
        this.result = buf;
        this.onloadend?.({ target: this });
      },
      (err) => this.onerror?.(err),
    );
  }
}

export function installFileReader(): void {
  const g = globalThis as unknown as { FileReader?: unknown };
  if (!g.FileReader) g.FileReader = MinimalFileReader;
}

// Minimal typing of what the tests touch.
export interface FitsjsHeader {
  get(key: string): unknown;
}
export interface FitsjsTable {
  rows: number;
  columns: string[];
  getRows(row: number, n: number, cb: (rows: Record<string, unknown>[]) => void): void;
  getColumn(name: string, cb: (values: unknown[] | ArrayLike<number>) => void): void;
}
export interface FitsjsHdu {
  header: FitsjsHeader;
  data?: FitsjsTable;
}
export interface Fitsjs {
  FITS: (new (arg: Blob, cb: (this: { hdus: FitsjsHdu[] }, f: { hdus: FitsjsHdu[] }) => void) => unknown) & {
    BinaryTable: new (header: FitsjsHeader, data: ArrayBuffer) => FitsjsTable;
    Header: new (block: string) => FitsjsHeader;
  };
}

/** Loads fitsjs from a given file (default: the installed, patched one). */
export function loadFitsjs(path?: string): Fitsjs {
  installFileReader();
  const require = createRequire(import.meta.url);
  const id = path ?? require.resolve('fitsjs');
  delete require.cache[id];
  return (require(id) as { astro: Fitsjs }).astro;
}

/** Opens bytes as a Blob, as in a browser, and resolves with the HDUs. */
export function openBlob(astro: Fitsjs, bytes: Uint8Array): Promise<FitsjsHdu[]> {
  return new Promise((resolve, reject) => {
    try {
      new astro.FITS(new Blob([bytes as Uint8Array<ArrayBuffer>]), function (this: { hdus: FitsjsHdu[] }) {
        resolve(this.hdus);
      });
    } catch (e) {
      reject(e);
    }
  });
}

/** All rows of a table, rejecting on an exception thrown inside fitsjs's callbacks. */
export function rowsOf(table: FitsjsTable): Promise<Record<string, unknown>[]> {
  return new Promise((resolve, reject) => {
    const onError = (e: unknown) => reject(e);
    process.once('uncaughtException', onError);
    try {
      table.getRows(0, table.rows, (rows) => {
        process.removeListener('uncaughtException', onError);
        resolve(rows);
      });
    } catch (e) {
      process.removeListener('uncaughtException', onError);
      reject(e);
    }
  });
}

export function columnOf(table: FitsjsTable, name: string): Promise<unknown[] | ArrayLike<number>> {
  return new Promise((resolve, reject) => {
    try {
      table.getColumn(name, resolve);
    } catch (e) {
      reject(e);
    }
  });
}
