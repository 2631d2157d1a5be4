/**
 * kiln inspect FILE: a readable summary of any FITS file — HDUs, key header values, checksum
 * status and a column summary. Exit 0 when readable, 1 when a CHECKSUM/DATASUM does not match,
 * 2 when the file cannot be read (one-line reason on stderr, printed by main.ts).
 */
import { readFitsFile } from '../node/fits-file.ts';
import type { ColumnValues, FitsFile, FitsHdu } from '../fits/index.ts';
import type { CommandSpec } from './args.ts';

/** Header keywords shown for every HDU when present. */
const KEY_KEYWORDS = ['HDUCLASS', 'HDUCLAS1', 'HDUCLAS2', 'HDUCLAS3', 'HDUVERS', 'TELESCOP', 'INSTRUME', 'DETNAM', 'FILTER', 'CHANTYPE', 'DETCHANS', 'NAXIS2'];

function range(values: ColumnValues): string {
  let lo = Infinity;
  let hi = -Infinity;
  let n = 0;
  const visit = (v: unknown) => {
    const x = typeof v === 'bigint' ? Number(v) : v;
    if (typeof x === 'number' && !Number.isNaN(x)) {
      if (x < lo) lo = x;
      if (x > hi) hi = x;
      n++;
    }
  };
  const all = values as ArrayLike<unknown>;
  for (let i = 0; i < all.length; i++) {
    const v = all[i];
    if (ArrayBuffer.isView(v)) {
      const cell = v as unknown as ArrayLike<unknown>;
      for (let k = 0; k < cell.length; k++) visit(cell[k]);
    } else visit(v);
  }
  return n ? `${fmt(lo)} .. ${fmt(hi)}` : '';
}

function fmt(x: number): string {
  return Number.isInteger(x) ? String(x) : String(Number(x.toPrecision(6)));
}

function checksumText(h: FitsHdu): string {
  const s = h.checksum;
  return `CHECKSUM ${s.checksum}, DATASUM ${s.datasum}`;
}

export function describeFile(file: FitsFile): string {
  const out: string[] = [`${file.fileName ?? '(bytes)'}: ${file.byteLength} bytes, ${file.hdus.length} HDU${file.hdus.length === 1 ? '' : 's'}`];
  for (const h of file.hdus) {
    out.push('', `[${h.index}] ${h.name || '(no EXTNAME)'}  ${h.type}  header ${h.headerBytes} B, data ${h.dataBytes} B  (${checksumText(h)})`);
    for (const k of KEY_KEYWORDS) {
      const v = h.header.get(k);
      if (v !== undefined && v !== null) out.push(`    ${k.padEnd(8)} = ${typeof v === 'string' ? `'${v}'` : String(v)}`);
    }
    if (h.table && h.table.columns.length) {
      const rows = h.table.columns.map((c) => [c.name, c.tform, c.unit ?? '', range(h.table!.values.get(c.name) ?? [])]);
      const w = [0, 1, 2].map((i) => Math.max(...rows.map((r) => r[i].length), ['column', 'TFORM', 'unit'][i].length));
      out.push(`    ${'column'.padEnd(w[0])}  ${'TFORM'.padEnd(w[1])}  ${'unit'.padEnd(w[2])}  min .. max`);
      for (const r of rows) out.push(`    ${r[0].padEnd(w[0])}  ${r[1].padEnd(w[1])}  ${r[2].padEnd(w[2])}  ${r[3]}`.trimEnd());
    }
  }
  return out.join('\n');
}

export const command: CommandSpec = {
  name: 'inspect',
  summary: 'Print the HDUs, key header values and columns of a FITS file. Exit 0 readable, 1 checksum mismatch, 2 unreadable.',
  usage: 'kiln inspect FILE',
  options: [],
  positionals: { min: 1, max: 1, names: 'FILE' },
  async run(args) {
    const file = readFitsFile(args.positionals[0], { verifyChecksums: 'report' });
    process.stdout.write(describeFile(file) + '\n');
    return file.hdus.some((h) => h.checksum.checksum === 'bad' || h.checksum.datasum === 'bad') ? 1 : 0;
  },
};
