/** `kiln inspect` through the real launcher (bin/kiln.mjs), as a user runs it. */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { writeFits } from '../../generators/fits/index.ts';
import { ALL_TYPES_HDUS } from './support/tables.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const tmp = mkdtempSync(join(tmpdir(), 'kiln-inspect-'));
const kiln = (...args: string[]) => spawnSync(process.execPath, [join(ROOT, 'bin', 'kiln.mjs'), 'inspect', ...args], { encoding: 'utf8', cwd: ROOT });

describe('kiln inspect', () => {
  const bytes = writeFits(ALL_TYPES_HDUS);
  const good = join(tmp, 'good.fits');
  writeFileSync(good, bytes);

  it('prints HDUs, checksum status and a column summary, exit 0', () => {
    const r = kiln(good);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/\[1\] ALLTYPES {2}bintable/);
    expect(r.stdout).toMatch(/CHECKSUM ok, DATASUM ok/);
    expect(r.stdout).toMatch(/NAXIS2 {3}= 3/);
    expect(r.stdout).toMatch(/SHORT +1I +-32768 \.\. 32767/);
    expect(r.stdout).toMatch(/FLOAT +1E +keV +-2\.25 \.\. 1\.5/);
  });

  it('exits 2 with a one-line reason on a truncated file', () => {
    const cut = join(tmp, 'cut.fits');
    writeFileSync(cut, bytes.subarray(0, 4000));
    const r = kiln(cut);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^kiln inspect: .*cut\.fits: HDU 1, byte 2880: missing END card/);
  });

  it('exits 1 when a checksum does not match, and says which', () => {
    const bad = bytes.slice();
    bad[bad.length - 2880 + 2] ^= 0x10;
    const p = join(tmp, 'bad.fits');
    writeFileSync(p, bad);
    const r = kiln(p);
    expect(r.status).toBe(1);
    expect(r.stdout).toMatch(/\[1\] ALLTYPES .*CHECKSUM bad, DATASUM bad/);
  });

  it('exits 2 on a missing file', () => {
    const r = kiln(join(tmp, 'nope.fits'));
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/nope\.fits: cannot read file \(ENOENT\)/);
  });
});
