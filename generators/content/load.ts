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
import { KilnInputError } from '../errors.ts';
import { checkMirrorCoversGrid, parseInstrumentText, parseRegionsText, parseReleaseText } from './documents.ts';
import { formatPath } from './issues.ts';
import { lineFitsFileOf, resolveDetector, type DocSource } from './resolve.ts';
import { CONTENT_DIRS, INSTRUMENT_FILE, LINEFITS_DIR, NOTES_FILE, REGIONS_FILE, RELEASE_FILE, type InstrumentDoc, type ReleaseDoc } from './schema.ts';
import { compareSemver } from './semver.ts';
import { parseSourceText, SOURCES_DIR, type SourceSpec } from './source-schema.ts';
import { parseLineFits, parseMirrorArea } from './tables.ts';
import type { ContentTree, InputFile, Instrument, Release, ResolvedRelease } from './types.ts';

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
  return {
    instrument: { ...doc, dir, file, mirror, sources },
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

/** Loads, validates and resolves the whole tree. Throws the first KilnInputError found. */
export async function loadContent(root: string): Promise<ContentTree> {
  if (!(await isDirectory(root)))
    throw new KilnInputError('content directory not found', { file: root, expected: `a directory with ${CONTENT_DIRS.instruments}/ and ${CONTENT_DIRS.releases}/` });
  const rel = (p: string) => p.slice(root.length).replace(/^[\\/]+/, '').split(/[\\/]/).join('/');

  const instruments = new Map<string, LoadedInstrument>();
  const insDir = join(root, CONTENT_DIRS.instruments);
  for (const name of await entryDirs(insDir, 'instrument')) {
    const loaded = await loadInstrumentAt(root, join(insDir, name, INSTRUMENT_FILE), rel);
    if (loaded.instrument.id !== name)
      throw releaseError(loaded.source, ['id'], 'instrument id differs from its directory name', loaded.instrument.id, `"${name}" (or rename the directory)`);
    instruments.set(name, loaded);
  }

  const relDir = join(root, CONTENT_DIRS.releases);
  const parsed: { release: Release; source: DocSource; inputs: InputFile[] }[] = [];
  for (const name of await entryDirs(relDir, 'release')) {
    const dir = join(relDir, name);
    const file = join(dir, RELEASE_FILE);
    const bytes = await readBytes(root, file, 'yaml', `${RELEASE_FILE}, the release description`);
    const { doc, yaml } = parseReleaseText(decode(bytes, file), file);
    const source: DocSource = { file, locate: yaml.locate };
    if (doc.id !== name) throw releaseError(source, ['id'], 'release id differs from its directory name', doc.id, `"${name}" (or rename the directory)`);
    if (!instruments.has(doc.instrument))
      throw releaseError(source, ['instrument'], 'unknown instrument', doc.instrument, `one of ${[...instruments.keys()].join(', ') || '(no instrument in the content tree)'}`);
    const notesFile = join(dir, NOTES_FILE);
    const notesBytes = await readBytes(root, notesFile, 'notes', `${NOTES_FILE}, the release notes in Markdown, beside ${RELEASE_FILE}`);
    const release: Release = { ...doc, dir, file, notesFile, notesMarkdown: decode(notesBytes, notesFile) };
    parsed.push({ release, source, inputs: [{ path: rel(file), bytes }, { path: rel(notesFile), bytes: notesBytes }] });
  }
  parsed.sort((a, b) => compareSemver(a.release.id, b.release.id));
  checkReleaseHistory(parsed);

  const releases: ResolvedRelease[] = [];
  for (const p of parsed) releases.push(await resolveRelease(root, p, instruments, rel));
  return {
    root,
    instruments: [...instruments.values()].map((l) => l.instrument),
    releases,
  };
}

function checkReleaseHistory(list: { release: ReleaseDoc; source: DocSource }[]): void {
  const byId = new Map(list.map((p) => [p.release.id, p]));
  const supersededBy = new Map<string, string>();
  for (const { release: r, source } of list) {
    if (r.supersedes === null) continue;
    const old = byId.get(r.supersedes);
    if (!old) throw releaseError(source, ['supersedes'], 'supersedes a release that does not exist', r.supersedes, `one of ${[...byId.keys()].filter((k) => k !== r.id).join(', ') || '(no other release)'}, or null`);
    if (compareSemver(r.supersedes, r.id) >= 0) throw releaseError(source, ['supersedes'], 'supersedes a release that is not older', r.supersedes, `a version below ${r.id}`);
    if (old.release.instrument !== r.instrument)
      throw releaseError(source, ['supersedes'], `supersedes a release of another instrument (${old.release.instrument})`, r.supersedes, `a release of ${r.instrument}`);
    supersededBy.set(r.supersedes, r.id);
  }
  for (const { release: r, source } of list)
    if (r.status === 'superseded' && !supersededBy.has(r.id))
      throw releaseError(source, ['status'], 'status is superseded but no release supersedes it', r.status, `a later release with supersedes: ${r.id}, or another status`);
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
  const inputs = [...p.inputs, ...ins.inputs];
  const used = new Set<string>();
  const detectors = [];
  for (const detectorId of Object.keys(release.detectors)) {
    const relFile = lineFitsFileOf(release, detectorId);
    const file = join(release.dir, relFile);
    used.add(file);
    if (!ins.instrument.detectors.some((d) => d.id === detectorId))
      throw releaseError(source, ['detectors', detectorId], 'unknown detector', detectorId, `a detector of ${ins.instrument.id}: ${ins.instrument.detectors.map((d) => d.id).join(', ')}`);
    const bytes = await readBytes(root, file, 'csv', `the line fits of detector ${detectorId} (${relFile} in the release directory)`);
    const lineFits = parseLineFits(decode(bytes, file), file);
    inputs.push({ path: rel(file), bytes });
    detectors.push(
      resolveDetector({
        instrument: ins.instrument as InstrumentDoc,
        instrumentSource: ins.source,
        release,
        releaseSource: source,
        detectorId,
        lineFits,
        lineFitsPath: rel(file),
        regionsSource: ins.regions?.source,
      }),
    );
  }
  // regions.yaml is an input of the releases whose products depend on it (as in the fingerprint).
  if (ins.regions && (release.productsPer !== 'detector' || detectors.some((d) => d.redistribution.transferLoss !== undefined))) inputs.push(ins.regions.input);
  // A line-fit file no detector uses is most likely a detector left out of release.yaml.
  const lfDir = join(release.dir, LINEFITS_DIR);
  if (await isDirectory(lfDir))
    for (const f of (await readdir(lfDir)).sort())
      if (f.endsWith('.csv') && !used.has(join(lfDir, f)))
        throw new KilnInputError('line-fit file not used by any detector of the release', {
          file: join(lfDir, f),
          expected: `a detector entry in ${RELEASE_FILE} (detectors.${f.slice(0, -4)}) or removal of the file`,
        });
  inputs.sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
  return { release, instrument: ins.instrument, detectors, inputs };
}
