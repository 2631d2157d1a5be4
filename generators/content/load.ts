/**
 * The content tree from disk: the only part of generators/content that touches the file system.
 *
 *   <root>/instruments/<id>/instrument.yaml + mirror-area.csv
 *   <root>/releases/<semver>/release.yaml, notes.md, linefits/<detector>.csv
 *   <root>/archive/          reserved for `kiln publish`; never read as input
 *
 * Every user mistake is a KilnInputError naming the file; nothing is written.
 */
import { lstat, readdir } from 'node:fs/promises';
import { readRegularFile } from '../node/files.ts';
import { LIMIT_NAMES, MAX_CSV_BYTES, MAX_NOTES_BYTES, MAX_YAML_BYTES } from './limits.ts';
import { basename, dirname, join } from 'node:path';
import { KilnInputError, throwInputErrors } from '../errors.ts';
import { checkMirrorCoversGrid, parseInstrumentText, parseRegionsText, parseReleaseText, parseSpectralText } from './documents.ts';
import { formatPath, valueAt } from './issues.ts';
import { lineFitsFileOf, resolveDetector, type DocSource } from './resolve.ts';
import { CONTENT_DIRS, energyGridSchema, INSTRUMENT_FILE, LINEFITS_DIR, NOTES_FILE, REGIONS_FILE, RELEASE_FILE, SPECTRAL_FILE, type InstrumentDoc } from './schema.ts';
import { compareSemver } from './semver.ts';
import { allowedReleaseKeys, qualifiedReleaseName } from './release-key.ts';
import { parseSourceText, SOURCES_DIR, type SourceSpec } from './source-schema.ts';
import { parseLineFits, parseMirrorArea } from './tables.ts';
import type { ContentTree, InputFile, Instrument, Release, ResolvedDetector, ResolvedRelease } from './types.ts';

const UTF8 = new TextDecoder('utf-8', { fatal: true });
/** Plain files allowed beside the entry directories (documentation). */
const IGNORED_FILES = /^(\..*|README(\.md)?)$/;

type FileKind = keyof typeof LIMIT_NAMES;
const MAX_BYTES: Record<FileKind, number> = { yaml: MAX_YAML_BYTES, notes: MAX_NOTES_BYTES, csv: MAX_CSV_BYTES };

/**
 * A content file: a regular file inside the tree (symbolic links, FIFOs and devices refused), at
 * most its kind's size limit.
 */
async function readBytes(root: string, file: string, kind: FileKind, expected: string): Promise<Uint8Array> {
  return readRegularFile(file, { root, maxBytes: MAX_BYTES[kind], limitName: LIMIT_NAMES[kind], expected });
}

function decode(bytes: Uint8Array, file: string): string {
  try {
    return UTF8.decode(bytes);
  } catch {
    throw new KilnInputError('not UTF-8 text', { file, expected: 'a UTF-8 text file' });
  }
}

/** A real directory (not a link to one: symbolic links are refused in the content tree). */
async function isDirectory(p: string): Promise<boolean> {
  let st;
  try {
    st = await lstat(p);
  } catch {
    return false;
  }
  if (st.isSymbolicLink())
    throw new KilnInputError('is a symbolic link; symbolic links are refused in the content tree', { file: p, expected: 'a real folder (replace the link by the folder)' });
  return st.isDirectory();
}

/** Entry directories under `dir`; stray plain files and hidden or linked folders are errors (they would be silently ignored). */
async function entryDirs(dir: string, what: string): Promise<string[]> {
  if (!(await isDirectory(dir))) return [];
  const out: string[] = [];
  for (const d of await readdir(dir, { withFileTypes: true })) {
    if (d.isSymbolicLink())
      throw new KilnInputError(`symbolic link in ${basename(dir)}/; symbolic links are refused in the content tree`, { file: join(dir, d.name), expected: `a real folder per ${what}` });
    if (d.isDirectory() && d.name.startsWith('.'))
      throw new KilnInputError(`hidden folder in ${basename(dir)}/ (its name starts with ".")`, { file: join(dir, d.name), expected: `a ${what} folder named by its id, or no such folder` });
    if (d.isDirectory()) out.push(d.name);
    else if (!IGNORED_FILES.test(d.name))
      throw new KilnInputError(`unexpected file in ${basename(dir)}/`, { file: join(dir, d.name), expected: `only one directory per ${what} (and README.md)` });
  }
  return out.sort();
}

interface LoadedInstrument {
  instrument: Instrument;
  source: DocSource;
  inputs: InputFile[];
  /** regions.yaml, when present: its source for errors and its bytes (an input only of releases that use regions). */
  regions: { source: DocSource; input: InputFile } | null;
}

/** Whether a path exists at all (a link or a folder named regions.yaml is then refused by readBytes). */
async function exists(p: string): Promise<boolean> {
  try {
    await lstat(p);
    return true;
  } catch {
    return false;
  }
}

async function loadInstrumentAt(root: string, file: string, rel: (p: string) => string): Promise<LoadedInstrument> {
  const bytes = await readBytes(root, file, 'yaml', `${INSTRUMENT_FILE}, the instrument description`);
  const { doc, yaml } = parseInstrumentText(decode(bytes, file), file);
  const dir = dirname(file);
  const mirrorFile = join(dir, doc.mirrorArea);
  const mirrorBytes = await readBytes(root, mirrorFile, 'csv', `the mirror effective-area table named by ${formatPath(['mirrorArea'])} (columns energy_keV,area_cm2)`);
  const mirror = parseMirrorArea(decode(mirrorBytes, mirrorFile), mirrorFile);
  checkMirrorCoversGrid(mirror, doc);
  const regionsFile = join(dir, REGIONS_FILE);
  let regions: LoadedInstrument['regions'] = null;
  if (await exists(regionsFile)) {
    const rb = await readBytes(root, regionsFile, 'yaml', `${REGIONS_FILE}, the readout nodes and row bands of the detectors`);
    const parsedRegions = parseRegionsText(decode(rb, regionsFile), regionsFile);
    const src: DocSource = { file: regionsFile, locate: parsedRegions.yaml.locate };
    for (const [id, g] of Object.entries(parsedRegions.doc.detectors)) {
      const d = doc.detectors.find((x) => x.id === id);
      if (!d) throw releaseError(src, ['detectors', id], 'unknown detector', id, `a detector of ${doc.id}: ${doc.detectors.map((x) => x.id).join(', ')}`);
      if (d.regions) throw releaseError(src, ['detectors', id], `regions of detector ${id} are also given in ${INSTRUMENT_FILE}`, id, 'regions in one of the two files');
      d.regions = g;
    }
    regions = { source: src, input: { path: rel(regionsFile), bytes: rb } };
  }
  const sources = await loadSourcesIn(root, join(dir, SOURCES_DIR));
  const spectralFile = join(dir, SPECTRAL_FILE);
  const spectral = (await exists(spectralFile))
    ? parseSpectralText(decode(await readBytes(root, spectralFile, 'yaml', `${SPECTRAL_FILE}, the bands, pile-up inputs and impact tolerances of the reference sources`), spectralFile), spectralFile).doc
    : undefined;
  return {
    instrument: { ...doc, dir, file, mirror, sources, ...(spectral ? { spectral } : {}) },
    source: { file, locate: yaml.locate },
    inputs: [
      { path: rel(file), bytes },
      { path: rel(mirrorFile), bytes: mirrorBytes },
    ],
    regions,
  };
}

/** One reference source document (sources/<id>.yaml). */
export async function loadSourceFile(path: string, root: string = dirname(path)): Promise<SourceSpec> {
  const bytes = await readBytes(root, path, 'yaml', 'a source description (YAML)');
  return parseSourceText(decode(bytes, path), path);
}

/** The reference sources of an instrument, sorted by file name; each id must equal its file name. */
async function loadSourcesIn(root: string, dir: string): Promise<SourceSpec[]> {
  if (!(await isDirectory(dir))) return [];
  const out: SourceSpec[] = [];
  for (const name of (await readdir(dir)).sort()) {
    if (IGNORED_FILES.test(name)) continue;
    const file = join(dir, name);
    if (!name.endsWith('.yaml')) throw new KilnInputError(`unexpected file in ${SOURCES_DIR}/`, { file, expected: 'only <source-id>.yaml files (and README.md)' });
    const s = await loadSourceFile(file, root);
    if (s.doc.id !== name.slice(0, -'.yaml'.length)) throw new KilnInputError('source id differs from its file name', { file, field: 'id', value: s.doc.id, expected: `"${name.slice(0, -5)}" (or rename the file)` });
    out.push(s);
  }
  return out;
}

/** One instrument.yaml (and its mirror table), e.g. for `kiln efficiency`. */
export async function loadInstrumentFile(path: string): Promise<Instrument> {
  return (await loadInstrumentAt(dirname(path), path, (p) => p)).instrument;
}

function releaseError(src: DocSource, path: (string | number)[], message: string, value: unknown, expected: string): KilnInputError {
  return new KilnInputError(message, { file: src.file, line: src.locate?.(path)?.line, field: formatPath(path), value, expected });
}

/** Runs `fn`; an input error is collected (and undefined returned) so that loading goes on. */
async function collecting<T>(errors: KilnInputError[], fn: () => T | Promise<T>): Promise<T | undefined> {
  try {
    return await fn();
  } catch (e) {
    if (e instanceof KilnInputError) {
      errors.push(e);
      return undefined;
    }
    throw e;
  }
}

/**
 * Loads, validates and resolves the whole tree. Every input problem found is reported at once
 * (a KilnInputErrors when there are several, in the order found); a part that depends on a
 * broken one (a release of an unreadable instrument) is skipped, not reported twice.
 */
export async function loadContent(root: string): Promise<ContentTree> {
  if (!(await isDirectory(root)))
    throw new KilnInputError('content directory not found', { file: root, expected: `a directory with ${CONTENT_DIRS.instruments}/ and ${CONTENT_DIRS.releases}/` });
  const rel = (p: string) => p.slice(root.length).replace(/^[\\/]+/, '').split(/[\\/]/).join('/');
  const errors: KilnInputError[] = [];

  const instruments = new Map<string, LoadedInstrument>();
  /** Instruments that exist but failed to load: their releases are not checked further. */
  const broken = new Set<string>();
  const insDir = join(root, CONTENT_DIRS.instruments);
  for (const name of (await collecting(errors, () => entryDirs(insDir, 'instrument'))) ?? []) {
    const loaded = await collecting(errors, () => loadInstrumentAt(root, join(insDir, name, INSTRUMENT_FILE), rel));
    if (!loaded) {
      broken.add(name);
      continue;
    }
    if (loaded.instrument.id !== name) {
      errors.push(releaseError(loaded.source, ['id'], 'instrument id differs from its directory name', loaded.instrument.id, `"${name}" (or rename the directory)`));
      broken.add(name);
      continue;
    }
    instruments.set(name, loaded);
  }

  const relDir = join(root, CONTENT_DIRS.releases);
  const parsed: { release: Release; source: DocSource; inputs: InputFile[] }[] = [];
  /** Release directories that failed to load: history checks do not guess about them. */
  const brokenReleases = new Set<string>();
  for (const name of (await collecting(errors, () => entryDirs(relDir, 'release'))) ?? []) {
    const dir = join(relDir, name);
    const file = join(dir, RELEASE_FILE);
    const one = await collecting(errors, async () => {
      const bytes = await readBytes(root, file, 'yaml', `${RELEASE_FILE}, the release description`);
      const { doc, yaml } = parseReleaseText(decode(bytes, file), file);
      const source: DocSource = { file, locate: yaml.locate };
      const keys = allowedReleaseKeys(doc.instrument, doc.id);
      if (!keys.includes(name)) throw releaseError(source, ['id'], 'release id differs from its directory name', doc.id, `a folder named "${keys[0]}" or "${keys[1]}" (or the id matching "${name}")`);
      if (!instruments.has(doc.instrument) && !broken.has(doc.instrument))
        throw releaseError(source, ['instrument'], 'unknown instrument', doc.instrument, `one of ${[...instruments.keys(), ...broken].sort().join(', ') || '(no instrument in the content tree)'}`);
      const notesFile = join(dir, NOTES_FILE);
      const notesBytes = await readBytes(root, notesFile, 'notes', `${NOTES_FILE}, the release notes in Markdown, beside ${RELEASE_FILE}`);
      const release: Release = { ...doc, key: name, supersedesKey: null, dir, file, notesFile, notesMarkdown: decode(notesBytes, notesFile) };
      return { release, source, inputs: [{ path: rel(file), bytes }, { path: rel(notesFile), bytes: notesBytes }] };
    });
    if (one) parsed.push(one);
    else brokenReleases.add(name);
  }
  parsed.sort((a, b) => compareSemver(a.release.id, b.release.id) || (a.release.instrument < b.release.instrument ? -1 : a.release.instrument > b.release.instrument ? 1 : 0));
  errors.push(...checkReleaseHistory(parsed, brokenReleases));

  const releases: ResolvedRelease[] = [];
  for (const p of parsed) {
    if (broken.has(p.release.instrument)) {
      // The model cannot be resolved without its instrument; the line-fit tables can still be read.
      for (const detectorId of Object.keys(p.release.detectors)) {
        const file = join(p.release.dir, lineFitsFileOf(p.release, detectorId));
        await collecting(errors, async () => parseLineFits(decode(await readBytes(root, file, 'csv', `the line fits of detector ${detectorId}`), file), file));
      }
      continue;
    }
    const r = await collecting(errors, () => resolveRelease(root, p, instruments, rel));
    if (r) releases.push(r);
  }
  throwInputErrors(errors);
  return {
    root,
    instruments: [...instruments.values()].map((l) => l.instrument),
    releases,
  };
}

/** `supersedes` names a release of the same instrument (ids are scoped by instrument); sets `supersedesKey`. */
function checkReleaseHistory(list: { release: Release; source: DocSource }[], broken: ReadonlySet<string>): KilnInputError[] {
  const errors: KilnInputError[] = [];
  const scoped = (instrument: string, id: string) => `${instrument}\u0000${id}`;
  const byId = new Map(list.map((p) => [scoped(p.release.instrument, p.release.id), p]));
  const supersededBy = new Set<string>();
  for (const { release: r, source } of list) {
    if (r.supersedes === null) continue;
    const old = byId.get(scoped(r.instrument, r.supersedes));
    if (!old && (broken.has(r.supersedes) || broken.has(qualifiedReleaseName(r.instrument, r.supersedes)))) continue; // reported already, as its own error
    if (!old) {
      const other = list.find((p) => p.release.id === r.supersedes && p.release.instrument !== r.instrument);
      if (other) errors.push(releaseError(source, ['supersedes'], `supersedes a release of another instrument (${other.release.instrument})`, r.supersedes, `a release of ${r.instrument}`));
      else {
        const own = list.filter((p) => p.release.instrument === r.instrument && p.release !== r).map((p) => p.release.id);
        errors.push(releaseError(source, ['supersedes'], 'supersedes a release that does not exist', r.supersedes, `one of ${own.join(', ') || `(no other release of ${r.instrument})`}, or null`));
      }
    } else if (compareSemver(r.supersedes, r.id) >= 0) errors.push(releaseError(source, ['supersedes'], 'supersedes a release that is not older', r.supersedes, `a version below ${r.id}`));
    else {
      supersededBy.add(old.release.key);
      r.supersedesKey = old.release.key;
    }
  }
  for (const { release: r, source } of list)
    if (r.status === 'superseded' && !supersededBy.has(r.key) && broken.size === 0)
      errors.push(releaseError(source, ['status'], 'status is superseded but no release supersedes it', r.status, `a later release with supersedes: ${r.id}, or another status`));
  return errors;
}

async function resolveRelease(
  root: string,
  p: { release: Release; source: DocSource; inputs: InputFile[] },
  instruments: Map<string, LoadedInstrument>,
  rel: (p: string) => string,
): Promise<ResolvedRelease> {
  const { release, source } = p;
  const ins = instruments.get(release.instrument);
  if (!ins) throw releaseError(source, ['instrument'], 'unknown instrument', release.instrument, `one of ${[...instruments.keys()].join(', ') || '(no instrument in the content tree)'}`);
  const instrument = await effectiveInstrument(root, ins, release, source, rel);
  const inputs = [...p.inputs, ...instrument.inputs];
  const used = new Set<string>();
  const detectors: ResolvedDetector[] = [];
  const errors: KilnInputError[] = [];
  const configurations = await collecting(errors, () => releaseConfigurations(ins, release, source));
  for (const detectorId of Object.keys(release.detectors)) {
    const relFile = lineFitsFileOf(release, detectorId);
    const file = join(release.dir, relFile);
    used.add(file);
    const d = await collecting(errors, async () => {
      if (!ins.instrument.detectors.some((x) => x.id === detectorId))
        throw releaseError(source, ['detectors', detectorId], 'unknown detector', detectorId, `a detector of ${ins.instrument.id}: ${ins.instrument.detectors.map((x) => x.id).join(', ')}`);
      const bytes = await readBytes(root, file, 'csv', `the line fits of detector ${detectorId} (${relFile} in the release directory)`);
      const lineFits = parseLineFits(decode(bytes, file), file);
      inputs.push({ path: rel(file), bytes });
      return resolveDetector({
        instrument: instrument.instrument as InstrumentDoc,
        instrumentSource: ins.source,
        release,
        releaseSource: source,
        detectorId,
        lineFits,
        lineFitsPath: rel(file),
        regionsSource: ins.regions?.source,
      });
    });
    if (d && configurations) detectors.push(...configuredDetectors(d, configurations));
  }
  // regions.yaml is an input of the releases whose products depend on it (as in the fingerprint).
  if (ins.regions && (release.productsPer !== 'detector' || detectors.some((d) => d.redistribution.transferLoss !== undefined))) inputs.push(ins.regions.input);
  // A line-fit file no detector uses is most likely a detector left out of release.yaml.
  const lfDir = join(release.dir, LINEFITS_DIR);
  if (await isDirectory(lfDir))
    for (const f of (await readdir(lfDir)).sort())
      if (f.endsWith('.csv') && !used.has(join(lfDir, f)))
        errors.push(
          new KilnInputError('line-fit file not used by any detector of the release', {
            file: join(lfDir, f),
            expected: `a detector entry in ${RELEASE_FILE} (detectors.${f.slice(0, -4)}) or removal of the file`,
          }),
        );
  throwInputErrors(errors);
  inputs.sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
  return { release, instrument: instrument.instrument, detectors, inputs };
}

type Configuration = NonNullable<InstrumentDoc['configurations']>[number];

/**
 * The configurations a release builds: those it lists under `configurations:` (each must be one
 * of its instrument's), else all of them; [null] for an instrument without configurations.
 */
function releaseConfigurations(ins: LoadedInstrument, release: Release, source: DocSource): (Configuration | null)[] {
  const declared = ins.instrument.configurations;
  if (!release.configurations) return declared ?? [null];
  if (!declared)
    throw releaseError(source, ['configurations'], `instrument ${ins.instrument.id} declares no configurations`, release.configurations, `no configurations field, or configurations: in ${basename(ins.source.file)} of ${ins.instrument.id}`);
  const errors: KilnInputError[] = [];
  const out: Configuration[] = [];
  release.configurations.forEach((id, i) => {
    const c = declared.find((x) => x.id === id);
    if (!c) errors.push(releaseError(source, ['configurations', i], 'unknown configuration', id, `one of ${declared.map((x) => x.id).join(', ')} (configurations of ${ins.instrument.id} in ${ins.source.file})`));
    else if (out.includes(c)) errors.push(releaseError(source, ['configurations', i], 'configuration listed twice', id, 'each configuration at most once'));
    else out.push(c);
  });
  throwInputErrors(errors);
  return out;
}

/**
 * One build entry per configuration: the detector with the configuration's filters in place of
 * its own, id `<detector>.<configuration>` (products, site documents, review pairing and the
 * finder then keep the configurations apart), name and FILTER value of the configuration.
 */
function configuredDetectors(d: ResolvedDetector, configurations: (Configuration | null)[]): ResolvedDetector[] {
  return configurations.map((c) =>
    c === null
      ? d
      : {
          ...d,
          id: `${d.id}.${c.id}`,
          name: `${d.name} (${c.title ?? c.id})`,
          stack: { ...d.stack, filters: c.filters.map((l) => ({ ...l, kind: 'filter' as const })) },
          configuration: { id: c.id, filter: c.filter, detector: d.id },
        },
  );
}

/**
 * The instrument as this release sees it: its grids and mirror table with the release's
 * `overrides` applied (a restated mirror table replaces the instrument's, also as an input file).
 */
async function effectiveInstrument(root: string, ins: LoadedInstrument, release: Release, source: DocSource, rel: (p: string) => string): Promise<{ instrument: Instrument; inputs: InputFile[] }> {
  const ov = release.overrides;
  if (!ov.mirrorArea && !ov.channels && !ov.energyGrid) return { instrument: ins.instrument, inputs: ins.inputs };
  const base = ins.instrument;
  const channels = { ...base.channels, ...ov.channels };
  const gridRaw = { ...base.energyGrid, ...ov.energyGrid };
  const grid = energyGridSchema.safeParse(gridRaw);
  if (!grid.success) {
    const iss = grid.error.issues[0];
    const path = ['overrides', 'energyGrid', ...iss.path];
    throw releaseError(source, path, `${iss.message} (release ${release.id}'s energy grid after its overrides)`, valueAt(gridRaw, iss.path), (iss as { params?: { expected?: string } }).params?.expected ?? 'a valid energy grid');
  }
  const energyGrid = grid.data;
  let mirror = base.mirror;
  let inputs = ins.inputs;
  if (ov.mirrorArea) {
    const file = join(release.dir, ov.mirrorArea);
    const bytes = await readBytes(root, file, 'csv', `the mirror effective-area table named by overrides.mirrorArea of release ${release.id} (columns energy_keV,area_cm2)`);
    mirror = parseMirrorArea(decode(bytes, file), file);
    // The instrument's own table is not an input of this release any more.
    inputs = [...ins.inputs.filter((f) => f.path !== rel(base.mirror.file)), { path: rel(file), bytes }];
  }
  const instrument: Instrument = { ...base, channels, energyGrid, mirror };
  checkMirrorCoversGrid(mirror, instrument);
  return { instrument, inputs };
}
