/**
 * Every input problem of a content tree at once, one per line, up to a cap: three mistakes in
 * three files are three lines, in the order the tree is read; a release of a broken instrument
 * still has its line-fit tables read; more than MAX_LISTED_INPUT_ERRORS problems end with one
 * line saying how many more there are.
 */
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { afterEach, describe, expect, it } from 'vitest';
import { loadContent } from '../../generators/content/index.ts';
import { KilnInputError, KilnInputErrors, MAX_LISTED_INPUT_ERRORS } from '../../generators/errors.ts';
import { INSTRUMENT, REPO, rel, scratchCopy, type Scratch } from './helpers.ts';

let s: Scratch | null = null;
afterEach(() => {
  s?.dispose();
  s = null;
});

async function errorsOf(root: string): Promise<KilnInputError> {
  try {
    await loadContent(root);
    expect.unreachable('loadContent accepted a broken tree');
  } catch (e) {
    expect(e).toBeInstanceOf(KilnInputError);
    return e as KilnInputError;
  }
  throw new Error('unreachable');
}

describe('all input errors at once', () => {
  it('three mistakes in three files: three lines, each naming its file, line and field', async () => {
    s = scratchCopy();
    s.replace(INSTRUMENT, 'depletionUm: 45', 'depletionUm: -45');
    s.replace(rel('2.0.0'), /^title: .*$/m, 'title: ""');
    s.replace(rel('1.1.0', 'linefits/fi0.csv'), /^Mn Kb,/m, 'Mn Ka,');
    const e = await errorsOf(s.root);
    expect(e).toBeInstanceOf(KilnInputErrors);
    const lines = e.lines();
    expect(lines).toHaveLength(3);
    expect(lines[0]).toContain(`${join(s.root, INSTRUMENT)}:${s.lineOf(INSTRUMENT, 'depletionUm: -45')}: detectors[0].stack.sensor.depletionUm`);
    expect(lines[1]).toContain(`${join(s.root, rel('2.0.0'))}:${s.lineOf(rel('2.0.0'), 'title: ""')}: title`);
    expect(lines[2]).toContain(`${join(s.root, rel('1.1.0', 'linefits/fi0.csv'))}:${s.lastLineStarting(rel('1.1.0', 'linefits/fi0.csv'), 'Mn Ka,')}`);
    expect(lines[2]).toMatch(/listed twice/);
    // The error still behaves as its first problem (file, field, one line without newlines).
    expect(e.where.field).toBe('detectors[0].stack.sensor.depletionUm');
    expect(e.oneLine()).not.toMatch(/\n/);
  });

  it('several problems in one file are each listed (no "and N more problems")', async () => {
    s = scratchCopy();
    s.replace(INSTRUMENT, 'depletionUm: 45', 'depletionUm: -45');
    s.replace(INSTRUMENT, 'fano: 0.118', 'fano: 1.2');
    const e = await errorsOf(s.root);
    const lines = e.lines();
    expect(lines.length).toBeGreaterThanOrEqual(2);
    expect(lines.join('\n')).not.toMatch(/more problem/);
    expect(lines.some((l) => l.includes('depletionUm'))).toBe(true);
    expect(lines.some((l) => l.includes('fano'))).toBe(true);
  });

  it('a release that fails to load causes no follow-on complaints about the releases around it', async () => {
    s = scratchCopy();
    s.remove(rel('1.1.0', 'notes.md'));
    const e = await errorsOf(s.root);
    // 2.0.0 supersedes 1.1.0 and 1.0.0 is superseded by it: neither is a second error.
    expect(e.lines()).toHaveLength(1);
    expect(e.lines()[0]).toMatch(/notes\.md: file not found/);
  });

  it(`beyond ${MAX_LISTED_INPUT_ERRORS} problems the list ends with how many more`, async () => {
    s = scratchCopy();
    const extra = MAX_LISTED_INPUT_ERRORS + 7;
    // Release folders without release.yaml: one "file not found" each.
    for (let i = 0; i < extra; i++) mkdirSync(join(s.root, 'releases', `9.0.${i}`));
    const e = await errorsOf(s.root);
    const lines = e.lines();
    expect(lines).toHaveLength(MAX_LISTED_INPUT_ERRORS + 1);
    expect(lines[MAX_LISTED_INPUT_ERRORS]).toBe(`… and 7 more problems not listed (fix these first)`);
    expect(lines.slice(0, -1).every((l) => /release\.yaml: file not found/.test(l))).toBe(true);
  });

  it('the CLI prints each problem on its own line, exit 2, no stack trace', () => {
    s = scratchCopy();
    s.replace(INSTRUMENT, 'depletionUm: 45', 'depletionUm: -45');
    s.replace(rel('2.0.0'), /^title: .*$/m, 'title: ""');
    const r = spawnSync(process.execPath, [join(REPO, 'bin', 'kiln.mjs'), 'build', '--content', s.root, '--out', join(s.root, '..', 'out'), '--quiet'], { encoding: 'utf8' });
    expect(r.status).toBe(2);
    const lines = r.stderr.split('\n').filter((l) => l !== '');
    expect(lines).toHaveLength(2);
    for (const l of lines) expect(l).toMatch(/^kiln build: \/.+:\d+: \S+: /);
    expect(r.stderr).not.toMatch(/^\s+at /m);
  });
});
