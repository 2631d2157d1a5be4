/**
 * Limits of content files (generators/content/limits.ts, README "Limits"): each kind's size limit,
 * regular files only (no FIFO, device, folder), symbolic links refused, hidden release folders
 * reported, a YAML alias bomb refused, the release id's length, and semver order beyond 2^53.
 * Each error names the file and the limit.
 */
import { mkdirSync, rmSync, symlinkSync, truncateSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { compareSemver, loadContent } from '../../generators/content/index.ts';
import { MAX_CSV_BYTES, MAX_NOTES_BYTES, MAX_YAML_BYTES } from '../../generators/content/limits.ts';
import { KilnInputError } from '../../generators/errors.ts';
import { rel, scratchCopy, type Scratch } from './helpers.ts';

let s: Scratch | undefined;
afterEach(() => s?.dispose());

async function loadError(edit: (s: Scratch) => void): Promise<KilnInputError> {
  s = scratchCopy();
  edit(s);
  try {
    await loadContent(s.root);
    expect.unreachable('the content tree must be refused');
  } catch (e) {
    expect(e).toBeInstanceOf(KilnInputError);
    return e as KilnInputError;
  }
  throw new Error('unreachable');
}

const NOTES = rel('2.0.0', 'notes.md');
const LINEFITS = rel('2.0.0', 'linefits/fi0.csv');

describe('size limits per kind, named in the error', () => {
  const cases: [string, string, number, RegExp][] = [
    ['notes', NOTES, MAX_NOTES_BYTES, /larger than the release notes limit \(1 MiB\)/],
    ['YAML', rel('2.0.0'), MAX_YAML_BYTES, /larger than the YAML file limit \(1 MiB\)/],
    ['CSV', LINEFITS, MAX_CSV_BYTES, /larger than the CSV table limit \(16 MiB\)/],
  ];
  for (const [kind, file, limit, message] of cases)
    it(`${kind}: one byte over ${limit} bytes is refused before it is read`, async () => {
      // A sparse file: its size is over the limit, its content never matters.
      const e = await loadError((x) => truncateSync(join(x.root, file), limit + 1));
      expect(e.where.file).toBe(join(s!.root, file));
      expect(e.message).toMatch(message);
      expect(e.oneLine()).toContain(`${limit + 1} bytes`);
    });
  it('notes at exactly the limit are read', async () => {
    s = scratchCopy();
    writeFileSync(join(s.root, NOTES), '# notes\n' + 'x'.repeat(MAX_NOTES_BYTES - 9) + '\n');
    const t = await loadContent(s.root);
    expect(t.releases.find((r) => r.release.id === '2.0.0')!.release.notesMarkdown.length).toBe(MAX_NOTES_BYTES);
  });
});

describe('regular files only; symbolic links refused', () => {
  it('a FIFO as notes.md is refused at once (it does not hang)', async () => {
    const e = await loadError((x) => {
      rmSync(join(x.root, NOTES));
      spawnSync('mkfifo', [join(x.root, NOTES)]);
    });
    expect(e.oneLine()).toMatch(/notes\.md: is a FIFO \(named pipe\); only regular files are read/);
  });
  it('a device as notes.md (a character device like /dev/zero: mknod c 1 5, Linux devices.txt) is refused', async () => {
    const e = await loadError((x) => {
      rmSync(join(x.root, NOTES));
      const r = spawnSync('mknod', [join(x.root, NOTES), 'c', '1', '5']);
      if (r.status !== 0) throw new Error(`test setup: mknod failed (needs root): ${r.stderr}`);
    });
    expect(e.oneLine()).toMatch(/notes\.md: is a device; only regular files are read/);
  });
  it('a link to /dev/zero as notes.md is refused as a link', async () => {
    const e = await loadError((x) => {
      rmSync(join(x.root, NOTES));
      symlinkSync('/dev/zero', join(x.root, NOTES));
    });
    expect(e.oneLine()).toMatch(/notes\.md: .*symbolic link; symbolic links are refused in the content tree/);
  });
  it('a link to a file outside the tree is refused naming the link', async () => {
    const e = await loadError((x) => {
      rmSync(join(x.root, LINEFITS));
      symlinkSync('/etc/hostname', join(x.root, LINEFITS));
    });
    expect(e.where.file).toBe(join(s!.root, LINEFITS));
    expect(e.message).toMatch(/symbolic link/);
  });
  it('a release folder that is a link is refused', async () => {
    const e = await loadError((x) => symlinkSync(join(x.root, 'releases', '2.0.0'), join(x.root, 'releases', '3.0.0')));
    expect(e.oneLine()).toMatch(/releases\/3\.0\.0: symbolic link in releases\//);
  });
  it('a folder where notes.md should be is refused', async () => {
    const e = await loadError((x) => {
      rmSync(join(x.root, NOTES));
      mkdirSync(join(x.root, NOTES));
    });
    expect(e.oneLine()).toMatch(/notes\.md: is a folder; only regular files are read/);
  });
});

describe('other hostile content', () => {
  it('a release folder starting with "." is reported, not skipped', async () => {
    const e = await loadError((x) => mkdirSync(join(x.root, 'releases', '.3.0.0')));
    expect(e.oneLine()).toMatch(/releases\/\.3\.0\.0: hidden folder in releases\//);
  });
  it('a YAML alias bomb ("billion laughs") is one input error naming the file', async () => {
    const e = await loadError((x) => {
      let t = 'x0: &a0 [lol, lol, lol, lol, lol, lol, lol, lol, lol]\n';
      for (let i = 1; i < 9; i++) t += `x${i}: &a${i} [${Array(9).fill(`*a${i - 1}`).join(', ')}]\n`;
      writeFileSync(join(x.root, rel('2.0.0')), x.read(rel('2.0.0')) + t);
    });
    expect(e.where.file).toBe(join(s!.root, rel('2.0.0')));
    expect(e.message).toMatch(/YAML could not be resolved/);
  });
  it('a 240-character release id names release.yaml and the length limit', async () => {
    const id = `1.0.0-${'a'.repeat(234)}`;
    const e = await loadError((x) => x.replace(rel('2.0.0'), 'id: 2.0.0', `id: ${id}`));
    expect(e.where.file).toBe(join(s!.root, rel('2.0.0')));
    expect(e.where.field).toBe('id');
    expect(e.message).toMatch(/release id is longer than 68 characters \(240\)/);
  });
});

describe('semver precedence beyond 2^53 (semver.org §11: numeric identifiers compare numerically)', () => {
  it('orders versions whose parts do not fit a double', () => {
    // 2^53 = 9007199254740992: as Numbers, 9007199254740993 equals 9007199254740992.
    expect(compareSemver('9007199254740993.0.0', '9007199254740992.0.0')).toBeGreaterThan(0);
    expect(compareSemver('1.0.9007199254740992', '1.0.9007199254740993')).toBeLessThan(0);
    expect(compareSemver('1.0.0-rc.9007199254740993', '1.0.0-rc.9007199254740992')).toBeGreaterThan(0);
    expect(compareSemver('1.0.0-rc.99999999999999999999', '1.0.0-rc.x')).toBeLessThan(0);
  });
});
