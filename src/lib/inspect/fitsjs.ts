/**
 * Second opinion from fitsjs 0.6.6 (patched in patches/): the HDU list and the energy column read
 * by an independent FITS reader, compared with the project's reader. fitsjs reads fixed-width
 * columns reliably; only ENERG_LO/ENERG_HI (always fixed width) are compared.
 */
interface FjHeader { get(k: string): unknown }
interface FjTable { rows: number; getColumn(name: string, cb: (v: ArrayLike<number>) => void): void }
interface FjHdu { header: FjHeader; data?: FjTable }
interface FjAstro { FITS: new (b: Blob, cb: (this: { hdus: FjHdu[] }) => void) => unknown }

async function loadFitsjs(): Promise<FjAstro> {
  // @ts-expect-error fitsjs ships no type declarations; the shape used is typed above.
  const m = (await import('fitsjs')) as unknown as { astro?: FjAstro; default?: { astro?: FjAstro } };
  const astro = m.astro ?? m.default?.astro;
  if (!astro) throw new Error('fitsjs did not load');
  return astro;
}

export interface SecondOpinion {
  hdus: { name: string; rows: number }[];
  /** Largest |fitsjs − kiln| / |kiln| over ENERG_LO of the main table, or null if not compared. */
  energLoMaxRelDiff: number | null;
  error: string | null;
}

export async function secondOpinion(bytes: Uint8Array, extname: string | null, kilnEnergLo: ArrayLike<number> | null): Promise<SecondOpinion> {
  try {
    const astro = await loadFitsjs();
    const hdus = await new Promise<FjHdu[]>((resolve, reject) => {
      try {
        new astro.FITS(new Blob([bytes as Uint8Array<ArrayBuffer>]), function (this: { hdus: FjHdu[] }) {
          resolve(this.hdus);
        });
      } catch (e) {
        reject(e);
      }
    });
    const list = hdus.map((h, i) => ({ name: i === 0 ? 'PRIMARY' : String(h.header.get('EXTNAME') ?? '').trim(), rows: h.data?.rows ?? 0 }));
    let diff: number | null = null;
    const hi = extname ? list.findIndex((h) => h.name.toUpperCase() === extname) : -1;
    const table = hi >= 0 ? hdus[hi].data : undefined;
    if (table && kilnEnergLo) {
      const col = await new Promise<ArrayLike<number>>((resolve) => table.getColumn('ENERG_LO', resolve));
      diff = 0;
      for (let i = 0; i < kilnEnergLo.length; i++) diff = Math.max(diff, Math.abs(col[i] - kilnEnergLo[i]) / Math.max(Math.abs(kilnEnergLo[i]), 1e-30));
    }
    return { hdus: list, energLoMaxRelDiff: diff, error: null };
  } catch (e) {
    return { hdus: [], energLoMaxRelDiff: null, error: (e as Error).message };
  }
}
