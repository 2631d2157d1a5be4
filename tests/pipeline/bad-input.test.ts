/**
 * Bad input to `kiln build`: exit 2, one line naming the file and the field, no stack trace, and
 * nothing written (a previous output stays byte-identical; without one, no out dir appears).
 */
import { cpSync, existsSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectOneLine, kiln, stagingLeft, treeDigest, workspace, type Workspace } from './helpers.ts';

const INSTRUMENT = 'instruments/quillon-tarncam/instrument.yaml';

interface Case {
  name: string;
  edit: (ws: Workspace) => void;
  /** Content-relative file the message must name. */
  file: string;
  /** Field (or a fragment of the message) that must be named. */
  field: string | RegExp;
  /** The bad value (or the expected one) as it must appear in the message. */
  value?: string;
}

/** A copy of release 2.0.0 as a draft under another directory name, with `id` in its release.yaml. */
function copyRelease(ws: Workspace, dir: string, id: string): void {
  cpSync(ws.path('releases/2.0.0'), ws.path(`releases/${dir}`), { recursive: true });
  ws.replace(`releases/${dir}/release.yaml`, /^id: 2\.0\.0$/m, `id: ${id}`);
  ws.replace(`releases/${dir}/release.yaml`, /^status: candidate$/m, 'status: draft');
}

const CASES: Case[] = [
  // Release ids are strict semantic versions (semver.org 2.0.0 §2: MAJOR.MINOR.PATCH).
  { name: 'release directory "1.2" (not MAJOR.MINOR.PATCH)', edit: (ws) => copyRelease(ws, '1.2', '"1.2"'), file: 'releases/1.2/release.yaml', field: /: id: /, value: '"1.2"' },
  { name: 'release directory "Bad" (not a version)', edit: (ws) => copyRelease(ws, 'Bad', 'Bad'), file: 'releases/Bad/release.yaml', field: /: id: /, value: '"Bad"' },
  { name: 'release directory "1.2.0 " (trailing space)', edit: (ws) => copyRelease(ws, '1.2.0 ', '1.2.0'), file: 'releases/1.2.0 /release.yaml', field: /: id: /, value: '"1.2.0 "' },
  { name: 'negative layer thickness', edit: (ws) => ws.replace(INSTRUMENT, 'thicknessUm: 0.08\n      contamination', 'thicknessUm: -0.08\n      contamination'), file: INSTRUMENT, field: 'detectors[0].stack.filters[1].thicknessUm', value: '-0.08' },
  { name: 'unknown element in a formula', edit: (ws) => ws.replace(INSTRUMENT, 'formula: Si3N4', 'formula: Si3Xx4'), file: INSTRUMENT, field: 'detectors[0].stack.surface[2].material.formula', value: 'Xx' },
  { name: 'missing notes.md', edit: (ws) => rmSync(ws.path('releases/2.0.0/notes.md')), file: 'releases/2.0.0/notes.md', field: /file not found/ },
];

let base: Workspace;
const spaces: Workspace[] = [];
beforeAll(() => {
  base = workspace();
  const r = kiln('build', '--content', base.content, '--out', base.out, '--quiet');
  if (r.status !== 0) throw new Error(`baseline build failed:\n${r.stderr}`);
});
afterAll(() => [base, ...spaces].forEach((w) => w?.dispose()));

describe('kiln build refuses bad input with one line and writes nothing', () => {
  for (const c of CASES) {
    it(c.name, () => {
      const ws = workspace();
      spaces.push(ws);
      c.edit(ws);
      // 1. With a previous output: it stays byte-identical.
      cpSync(base.out, ws.out, { recursive: true });
      const before = treeDigest(ws.out);
      const r = kiln('build', '--content', ws.content, '--out', ws.out);
      expect(r.status).toBe(2);
      const line = expectOneLine(r.stderr);
      expect(line.startsWith('kiln build: ')).toBe(true);
      expect(line).toContain(ws.path(c.file));
      if (typeof c.field === 'string') expect(line).toContain(`: ${c.field}: `);
      else expect(line).toMatch(c.field);
      if (c.value) expect(line).toContain(c.value);
      expect(r.stdout).toBe('');
      expect(treeDigest(ws.out)).toEqual(before);
      expect(stagingLeft(ws.out)).toEqual([]);
      // 2. Without one: no out dir appears at all.
      renameSync(ws.out, join(ws.dir, 'kept'));
      const again = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
      expect(again.status).toBe(2);
      expect(existsSync(ws.out)).toBe(false);
      expect(stagingLeft(ws.out)).toEqual([]);
    });
  }

  it('a bad --workers value is a usage error (exit 2, one line)', () => {
    const ws = workspace();
    spaces.push(ws);
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--workers', '0');
    expect(r.status).toBe(2);
    expect(expectOneLine(r.stderr)).toMatch(/--workers/);
    expect(existsSync(ws.out)).toBe(false);
  });
});
