/**
 * kiln compare: two release ids (read from a build's output) or two product files. Node layer:
 * reads the files, then hands the data to the pure tables in generators/compare/.
 */
import { existsSync, readFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { findReleaseByName } from '../content/release-key.ts';
import { compareArf, compareRmf } from '../checks/index.ts';
import { arfDiffTable, parameterDiffs, rmfDiffTable, type ComparedPair, type CompareReport } from '../compare/index.ts';
import { KilnInputError } from '../errors.ts';
import { readFitsFile } from '../node/index.ts';
import { identifyProduct, readArf, readRmf } from '../ogip/index.ts';
import type { ReleaseIndex, ReleaseSite, ReleaseSpectral } from '../site-data/types.ts';
import { SPECTRAL_FILE } from '../content/schema.ts';
import type { Instrument } from '../content/types.ts';
import { releaseSpectral } from './impact.ts';
import { arfValidOn } from './validity.ts';
import { hasReleaseSummary, readReleaseSite } from './site-files.ts';

/**
 * The key of a release named on the command line (key, instrument~id, or a bare id that only one
 * instrument uses), from the build's index; the name itself when the output has no index.
 */
export function builtReleaseKey(outDir: string, name: string): { key: string; instrument: string | null } {
  const file = join(outDir, 'index.json');
  if (!existsSync(file)) return { key: name, instrument: null };
  const index = JSON.parse(readFileSync(file, 'utf8')) as ReleaseIndex;
  const r = findReleaseByName(index.releases.map((x) => ({ ...x, key: x.key ?? x.id })), name, { file });
  return { key: r.key, instrument: r.instrument };
}

/** Both releases of a comparison, by key; a pair of two instruments is refused (its products describe different hardware). */
export function comparedKeys(outDir: string, a: string, b: string): [string, string] {
  const ka = builtReleaseKey(outDir, a);
  const kb = builtReleaseKey(outDir, b);
  if (ka.instrument !== null && kb.instrument !== null && ka.instrument !== kb.instrument)
    throw new KilnInputError(`releases of two instruments cannot be compared (${ka.instrument} and ${kb.instrument})`, {
      file: join(outDir, 'index.json'),
      value: `${a} (${ka.instrument}) and ${b} (${kb.instrument})`,
      expected: 'two releases of the same instrument (or two product files, compared as files)',
    });
  return [ka.key, kb.key];
}

function readSite(outDir: string, id: string): ReleaseSite {
  const dir = join(outDir, 'releases', id);
  if (!hasReleaseSummary(dir))
    throw new KilnInputError(`release ${id} not found in the build output`, { file: join(dir, 'summary.json'), value: id, expected: 'a release id built by `kiln build` (or two FITS files)' });
  return readReleaseSite(dir, { profiles: false, matrix: false }).site;
}


export function compareReleases(outDir: string, nameA: string, nameB: string): CompareReport {
  const [idA, idB] = comparedKeys(outDir, nameA, nameB);
  const A = readSite(outDir, idA);
  const B = readSite(outDir, idB);
  const dir = (id: string) => join(outDir, 'releases', id);
  const pairs: ComparedPair[] = [];
  const unmatched: string[] = [];
  for (const pb of B.products) {
    if (pb.kind === 'rsp') continue;
    const pa = pb.kind === 'rmf' ? A.products.find((p) => p.kind === 'rmf' && p.detector === pb.detector) : arfValidOn(A.products, pb.detector, pb.validFrom);
    if (!pa) {
      unmatched.push(`${idB}:${pb.id}`);
      continue;
    }
    const label = pb.kind === 'rmf' ? `${pb.detector} RMF` : `${pb.detector} ARF (${pa.epoch} → ${pb.epoch})`;
    if (pb.kind === 'rmf') {
      const a = readRmf(readFitsFile(join(dir(idA), pa.path))).data;
      const b = readRmf(readFitsFile(join(dir(idB), pb.path))).data;
      const rmf = rmfDiffTable(a, b);
      // The verdicts are judged at the energies of the table they are printed under.
      pairs.push({ label, detector: pb.detector, a: `${idA}:${pa.id}`, b: `${idB}:${pb.id}`, kind: 'rmf', rmf, checks: compareRmf(a, b, pb.id, { energiesKeV: rmf.map((x) => x.energyKeV) }) });
    } else {
      const a = readArf(readFitsFile(join(dir(idA), pa.path))).data;
      const b = readArf(readFitsFile(join(dir(idB), pb.path))).data;
      pairs.push({ label, detector: pb.detector, a: `${idA}:${pa.id}`, b: `${idB}:${pb.id}`, kind: 'arf', arf: arfDiffTable(a, b), checks: compareArf(a, b, pb.id) });
    }
  }
  for (const pa of A.products)
    if (pa.kind !== 'rsp' && !B.products.some((p) => p.kind === pa.kind && p.detector === pa.detector)) unmatched.push(`${idA}:${pa.id}`);
  return { schema: 'kiln/compare/1', a: idA, b: idB, pairs, parameters: parameterDiffs(A.parameters, B.parameters), unmatched };
}

export function compareFiles(fileA: string, fileB: string): CompareReport {
  const fa = readFitsFile(fileA);
  const fb = readFitsFile(fileB);
  const ka = identifyProduct(fa);
  const kb = identifyProduct(fb);
  const a = basename(fileA);
  const b = basename(fileB);
  if (!ka || !kb || ka !== kb || ka === 'pha')
    throw new KilnInputError('files are not two response products of the same kind', {
      file: !ka || ka === 'pha' ? fileA : fileB,
      value: `${ka ?? 'unknown'} and ${kb ?? 'unknown'}`,
      expected: 'two RMFs or two ARFs',
    });
  let pair: ComparedPair;
  if (ka === 'rmf') {
    const ra = readRmf(fa).data;
    const rb = readRmf(fb).data;
    const rmf = rmfDiffTable(ra, rb);
    pair = { label: 'RMF', detector: null, a, b, kind: 'rmf', rmf, checks: compareRmf(ra, rb, b, { energiesKeV: rmf.map((x) => x.energyKeV) }) };
  } else {
    const ra = readArf(fa).data;
    const rb = readArf(fb).data;
    pair = { label: 'ARF', detector: null, a, b, kind: 'arf', arf: arfDiffTable(ra, rb), checks: compareArf(ra, rb, b) };
  }
  return { schema: 'kiln/compare/1', a, b, pairs: [pair], parameters: [], unmatched: [] };
}

/**
 * `kiln compare A B --impact`: each reference source of the release's instrument simulated with
 * B's responses and fitted with both (the build's impact, for any pair). The sources and spectral
 * settings come from the content tree the releases were built from.
 */
export function compareImpact(outDir: string, instrument: Instrument, nameA: string, nameB: string, log: (line: string) => void = () => {}): ReleaseSpectral {
  const [idA, idB] = comparedKeys(outDir, nameA, nameB);
  const A = readSite(outDir, idA);
  const B = readSite(outDir, idB);
  if (!instrument.spectral || !(instrument.sources ?? []).length)
    throw new KilnInputError('the instrument has no reference sources to fold', { file: join(instrument.dir, SPECTRAL_FILE), expected: `a ${SPECTRAL_FILE} and sources/<id>.yaml beside ${basename(instrument.file)} (README "Reference sources and impact")` });
  const side = (id: string, s: ReleaseSite) => ({ id, dir: join(outDir, 'releases', id), products: s.products });
  return releaseSpectral(instrument, side(idB, B), side(idA, A), log)!;
}
