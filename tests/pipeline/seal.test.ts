/**
 * The seal and the archive it covers (generators/pipeline/archive.ts): every tampering of an
 * archive file or of a seal field stops `kiln build` with exit 2 and one line naming the archive
 * file (never an internal staging path), and nothing is written outside --out. The committed
 * archives 1.0.0 and 1.1.0 (kiln/seal/1) are still accepted with every check their version
 * allows; a kiln/seal/2 refuses any edit of its own fields. SHA-256 values the tests write are
 * computed with node:crypto (FIPS 180-4), not with Kiln's hash module.
 */
import { cpSync, existsSync, mkdirSync, readFileSync, renameSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_CONTENT, expectOneLine, kiln, sha256, workspace, type Workspace } from './helpers.ts';

const ID = '1.1.0';
const ARCHIVE = `archive/${ID}`;
const RMF = `files/quillon-tarncam_fi0_${ID}.rmf.gz`;

interface SealJson {
  schema: string;
  release: string;
  date: string;
  inputsSha256: string;
  inputFiles: Record<string, string>;
  files: ({ path: string; bytes: number; sha256: string } | null | Record<string, never>)[];
  status?: string;
  sealSha256?: string;
  [k: string]: unknown;
}

let ws: Workspace;
beforeAll(() => {
  ws = workspace();
});
afterAll(() => ws.dispose());

const sealPath = () => ws.path(`${ARCHIVE}/seal.json`);
const readSealJson = (): SealJson => JSON.parse(readFileSync(sealPath(), 'utf8')) as SealJson;
const writeSealJson = (s: unknown) => writeFileSync(sealPath(), JSON.stringify(s, null, 2));

/** Puts the committed archive (and release.yaml) back before each case. */
function restore(): void {
  rmSync(ws.path(ARCHIVE), { recursive: true, force: true });
  cpSync(join(DEMO_CONTENT, ARCHIVE), ws.path(ARCHIVE), { recursive: true });
  writeFileSync(ws.path(`releases/${ID}/release.yaml`), readFileSync(join(DEMO_CONTENT, `releases/${ID}/release.yaml`)));
}

/** `kiln build` refuses with exit 2 and one line matching `what` that names `file`. */
function refused(what: RegExp, file: string): string {
  const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
  const line = expectOneLine(r.stderr);
  expect(r.status, r.stderr).toBe(2);
  expect(line).toMatch(what);
  expect(line).toContain(file);
  expect(line).not.toMatch(/staging|\/tmp\/kiln-publish/);
  expect(existsSync(ws.out)).toBe(false);
  return line;
}

/** Canonical JSON (keys sorted) written out here, to make a v2 seal independently of Kiln's code. */
function canonical(v: unknown): string {
  if (v === null || typeof v !== 'object') return JSON.stringify(v);
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  return `{${Object.keys(v as object).sort().map((k) => `${JSON.stringify(k)}:${canonical((v as Record<string, unknown>)[k])}`).join(',')}}`;
}
function asV2(s: SealJson): SealJson {
  const { sealSha256: _x, ...rest } = { ...s, schema: 'kiln/seal/2', status: 'published' };
  return { ...rest, sealSha256: sha256(Buffer.from(canonical(rest))) };
}

describe('the committed kiln/seal/1 archives are accepted unchanged', () => {
  it('kiln build verifies 1.0.0 and 1.1.0 with their complete file lists', () => {
    restore();
    const r = kiln('build', '--content', ws.content, '--out', ws.out);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/release 1\.0\.0 \(superseded\): 4 archived products verified/);
    expect(r.stderr).toMatch(/release 1\.1\.0 \(published\): 8 archived products verified/);
    rmSync(ws.out, { recursive: true, force: true });
  });
});

describe('tampered archive files: exit 2 naming the archive file', () => {
  const cases: [string, () => string, RegExp][] = [
    ['an extra file in files/', () => (writeFileSync(ws.path(`${ARCHIVE}/files/extra.rmf.gz`), 'x'), `${ARCHIVE}/files/extra.rmf.gz`), /holds a file its seal does not list/],
    ['an extra file beside the seal', () => (writeFileSync(ws.path(`${ARCHIVE}/notes.txt`), 'x'), `${ARCHIVE}/notes.txt`), /holds a file its seal does not list/],
    ['a new subfolder', () => (mkdirSync(ws.path(`${ARCHIVE}/more`)), writeFileSync(ws.path(`${ARCHIVE}/more/a.gz`), 'x'), `${ARCHIVE}/more/a.gz`), /holds a file its seal does not list/],
    ['a symbolic link in files/', () => (symlinkSync('/etc/hostname', ws.path(`${ARCHIVE}/files/link.gz`)), `${ARCHIVE}/files/link.gz`), /symbolic link/],
    [
      'a product replaced by a folder',
      () => (rmSync(ws.path(`${ARCHIVE}/${RMF}`)), mkdirSync(ws.path(`${ARCHIVE}/${RMF}`)), `${ARCHIVE}/${RMF}`),
      /is a folder, not a regular file/,
    ],
    ['a product removed', () => (rmSync(ws.path(`${ARCHIVE}/${RMF}`)), `${ARCHIVE}/${RMF}`), /file is missing/],
    [
      'one byte of a product changed',
      () => {
        const b = readFileSync(ws.path(`${ARCHIVE}/${RMF}`));
        b[100] ^= 1;
        writeFileSync(ws.path(`${ARCHIVE}/${RMF}`), b);
        return `${ARCHIVE}/${RMF}`;
      },
      /corrupt or was altered/,
    ],
    [
      're-sealed after a product changed (seal updated, site data not)',
      () => {
        const b = readFileSync(ws.path(`${ARCHIVE}/${RMF}`));
        b[100] ^= 1;
        writeFileSync(ws.path(`${ARCHIVE}/${RMF}`), b);
        const s = readSealJson();
        const f = s.files.find((x) => x && 'path' in x && x.path === RMF) as { bytes: number; sha256: string };
        f.sha256 = sha256(b);
        writeSealJson(s);
        return `${ARCHIVE}/site.json`;
      },
      /advertises a hash or size the seal does not have/,
    ],
    ['the seal removed', () => (rmSync(sealPath()), `${ARCHIVE}/seal.json`), /file is missing/],
    ['the seal not JSON', () => (writeFileSync(sealPath(), '{"schema": "kiln/seal/1",'), `${ARCHIVE}/seal.json`), /not valid JSON/],
  ];
  for (const [name, tamper, what] of cases)
    it(name, () => {
      restore();
      refused(what, tamper());
    });
});

describe('tampered seal fields (kiln/seal/1): exit 2 naming seal.json and the field', () => {
  const edits: [string, (s: SealJson) => void, RegExp, string?][] = [
    ['an entry removed: its file is then unlisted', (s) => s.files.splice(s.files.findIndex((f) => f && 'path' in f && f.path === RMF), 1), /holds a file its seal does not list/, `${ARCHIVE}/${RMF}`],
    ['an entry null', (s) => (s.files[0] = null), /files\[0\]: wrong type \(null\)/],
    ['an entry empty', (s) => (s.files[0] = {}), /files\[0\]\.(path|bytes|sha256): missing required field/],
    ['no entries', (s) => (s.files = []), /files: too small/],
    ['a path leaving the archive', (s) => ((s.files[0] as { path: string }).path = 'files/../../../../outside'), /files\[0\]\.path: not a path inside the archive folder/],
    ['an absolute path', (s) => ((s.files[0] as { path: string }).path = '/etc/hostname'), /files\[0\]\.path: not a path inside the archive folder/],
    ['an input path leaving the content tree', (s) => (s.inputFiles['../../x'] = 'a'.repeat(64)), /not a path inside the content tree/],
    ['the date', (s) => (s.date = '2027-02-09'), /seal date differs from the release date/],
    ['a size', (s) => ((s.files[0] as { bytes: number }).bytes += 1), /corrupt or was altered/, `${ARCHIVE}/files/`],
    ['another release', (s) => (s.release = '1.0.0'), /seal describes another release/],
    ['an unknown field', (s) => (s.signedBy = 'someone'), /unknown field "signedBy"/],
    ['an entry listed twice', (s) => s.files.push(s.files[0]), /seal lists a file twice/],
    ['an unknown schema', (s) => (s.schema = 'kiln/seal/9'), /schema: unknown variant/],
  ];
  for (const [name, edit, what, file] of edits)
    it(name, () => {
      restore();
      const s = readSealJson();
      edit(s);
      writeSealJson(s);
      refused(what, file ?? `${ARCHIVE}/seal.json`);
    });
});

describe('kiln/seal/2 covers its own fields', () => {
  it('an equivalent v2 seal of 1.1.0 is accepted', () => {
    restore();
    writeSealJson(asV2(readSealJson()));
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status, r.stderr).toBe(0);
    rmSync(ws.out, { recursive: true, force: true });
  });
  const edits: [string, (s: SealJson) => void][] = [
    ['date', (s) => (s.date = '2027-02-08 ')],
    ['status', (s) => (s.status = 'withdrawn')],
    ['inputsSha256', (s) => (s.inputsSha256 = 'f'.repeat(64))],
    ['an inputFiles hash', (s) => (s.inputFiles[Object.keys(s.inputFiles)[0]] = '0'.repeat(64))],
    ['an inputFiles entry removed', (s) => delete s.inputFiles[Object.keys(s.inputFiles)[0]]],
  ];
  for (const [name, edit] of edits)
    it(`an edit of ${name} without a new sealSha256 is refused`, () => {
      restore();
      const s = asV2(readSealJson());
      edit(s);
      writeSealJson(s);
      refused(name === 'date' ? /date/ : /seal was edited after sealing/, `${ARCHIVE}/seal.json`);
    });
});

describe('status of an archived release only moves forward', () => {
  it('published → candidate is refused and says how to finish an interrupted publish', () => {
    restore();
    ws.replace(`releases/${ID}/release.yaml`, 'status: published', 'status: candidate');
    const line = refused(/archived as published; its status may only move forward/, `releases/${ID}/release.yaml`);
    expect(line).toContain(`kiln publish ${ID}`);
  });
  it('published → draft is refused', () => {
    restore();
    ws.replace(`releases/${ID}/release.yaml`, 'status: published', 'status: draft');
    refused(/status may only move forward \(published → superseded → withdrawn\)/, `releases/${ID}/release.yaml`);
  });
  it('superseded → published (1.0.0, sealed as superseded) is refused', () => {
    restore();
    ws.replace('releases/1.0.0/release.yaml', 'status: superseded', 'status: published');
    refused(/archived as superseded/, 'releases/1.0.0/release.yaml');
    ws.write('releases/1.0.0/release.yaml', readFileSync(join(DEMO_CONTENT, 'releases/1.0.0/release.yaml'), 'utf8'));
  });
  it('published → withdrawn builds, served from the archive', () => {
    restore();
    ws.replace(`releases/${ID}/release.yaml`, 'status: published', 'status: withdrawn');
    const r = kiln('build', '--content', ws.content, '--out', ws.out);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/release 1\.1\.0 \(withdrawn\): 8 archived products verified/);
    rmSync(ws.out, { recursive: true, force: true });
  });
});

describe('"inputs changed" names only what changed', () => {
  it('a line-fit edit together with a status change names only the line-fit file', () => {
    restore();
    ws.replace(`releases/${ID}/release.yaml`, 'status: published', 'status: withdrawn');
    ws.replace(`releases/${ID}/notes.md`, /\n/, '\nA corrected sentence.\n');
    const csv = `releases/${ID}/linefits/fi0.csv`;
    const original = ws.read(csv);
    ws.replace(csv, 'Al Ka,1.4867,1.48835', 'Al Ka,1.4867,1.48840');
    const line = refused(/inputs of withdrawn release 1\.1\.0 changed since it was published/, `releases/${ID}/release.yaml`);
    expect(line).toMatch(/changed files: releases\/1\.1\.0\/linefits\/fi0\.csv"/);
    ws.write(csv, original);
    writeFileSync(ws.path(`releases/${ID}/notes.md`), readFileSync(join(DEMO_CONTENT, `releases/${ID}/notes.md`)));
  });
});

describe('a seal path never reads or writes outside the trees', () => {
  it('a traversal entry pointing at a file outside: refused before reading, nothing written beside --out', () => {
    restore();
    const outside = join(ws.dir, 'outside-secret');
    writeFileSync(outside, 'secret');
    const s = readSealJson();
    s.files.push({ path: 'files/../../../outside-secret', bytes: 6, sha256: sha256(Buffer.from('secret')) });
    writeSealJson(s);
    refused(/not a path inside the archive folder/, `${ARCHIVE}/seal.json`);
    expect(existsSync(join(ws.dir, 'out'))).toBe(false);
    renameSync(outside, outside + '.seen');
  });
});
