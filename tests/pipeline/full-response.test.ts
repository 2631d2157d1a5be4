/**
 * The combined matrix on request (`products: [rmf, arf, rsp]`): one full response per epoch,
 * OGIP `SPECRESP MATRIX` with HDUCLAS3 FULL (OGIP CAL/GEN/92-002a, from memory), whose rows are
 * the redistribution rows times the effective area of their energy bin. astropy (Debian
 * python3-astropy) reads the files independently of our reader.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { afterAll, describe, expect, it } from 'vitest';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';
import { kiln, workspace, type Workspace } from './helpers.ts';

const spaces: Workspace[] = [];
afterAll(() => spaces.forEach((w) => w.dispose()));

interface Manifest {
  files: { path: string; kind: string; detector: string; epoch: string }[];
}

describe('full response products', () => {
  const ws = workspace();
  spaces.push(ws);
  ws.replace('releases/2.0.0/release.yaml', /^products: \[rmf, arf\]$/m, 'products: [rmf, arf, rsp]');
  const built = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
  const rel = join(ws.out, 'releases/2.0.0');
  const manifest = () => JSON.parse(readFileSync(join(rel, 'manifest.json'), 'utf8')) as Manifest;

  it('builds one RSP per detector and epoch, each passing kiln check', () => {
    expect(built.status, built.stderr).toBe(0);
    const m = manifest();
    const rsp = m.files.filter((f) => f.kind === 'rsp');
    const arf = m.files.filter((f) => f.kind === 'arf');
    expect(rsp.length).toBe(arf.length);
    expect(rsp.length).toBeGreaterThan(0);
    const r = kiln('check', ...rsp.map((f) => join(rel, f.path)));
    expect(r.status, r.stdout).toBe(0);
  });

  it.runIf(runAstropyChecks)('astropy: SPECRESP MATRIX, HDUCLAS3 FULL, rows = RMF rows × ARF area (relative 1e-6, float32 storage)', () => {
    const m = manifest();
    const rsp = m.files.find((f) => f.kind === 'rsp')!;
    const arf = m.files.find((f) => f.kind === 'arf' && f.detector === rsp.detector && f.epoch === rsp.epoch)!;
    const rmf = m.files.find((f) => f.kind === 'rmf' && f.detector === rsp.detector)!;
    const paths = [rsp, arf, rmf].map((f) => join(rel, f.path));
    for (const p of paths) expect(gunzipSync(readFileSync(p)).subarray(0, 6).toString('latin1')).toBe('SIMPLE');
    const out = runPythonJson<{ extname: string; hduclas3: string; worst: number; rows: number }>(
      'astropy',
      `import json, sys, numpy as np
from astropy.io import fits
rsp, arf, rmf = json.load(sys.stdin)
with fits.open(rsp, checksum=True) as a, fits.open(arf) as b, fits.open(rmf) as c:
    m = a[1]; area = b['SPECRESP'].data['SPECRESP']; r = c['MATRIX'].data
    worst = 0.0
    for i in range(len(m.data)):
        full = np.asarray(m.data['MATRIX'][i], dtype=float)
        red = np.asarray(r['MATRIX'][i], dtype=float)
        if len(full) != len(red): worst = 1.0; break
        want = red * float(area[i])
        scale = max(float(np.max(np.abs(want))), 1e-30)
        worst = max(worst, float(np.max(np.abs(full - want))) / scale) if len(full) else worst
    print(json.dumps({"extname": m.name, "hduclas3": m.header["HDUCLAS3"], "worst": worst, "rows": len(m.data)}))`,
      paths,
    );
    expect(out.extname).toBe('SPECRESP MATRIX');
    expect(out.hduclas3).toBe('FULL');
    expect(out.rows).toBeGreaterThan(100);
    expect(out.worst).toBeLessThan(1e-6);
  });
});
