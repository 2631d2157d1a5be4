/**
 * The published-correction workflow, end to end through the CLI (README "How to correct a
 * published release"): the mirror area turns out 10 % low above nothing in particular — every
 * row × 0.9 — after 2.0.0 is published.
 *   1. Editing the instrument's mirror table is refused: it is an input of published releases.
 *   2. A new release 2.1.0 restates the table (`overrides.mirrorArea`) and supersedes 2.0.0.
 *   3. `kiln report` shows the area change as review items, measured against allowed.
 *   4. `kiln publish` refuses while they are open; accepted in release.yaml (check, product,
 *      reason, role) it publishes, records the sign-off in the seal and marks 2.0.0 superseded
 *      in its release.yaml (only the status line; its archive byte for byte as it was).
 *   5. The next build serves both from their archives; astropy reads the two ARFs of one epoch
 *      and finds the ratio the test wrote into the table (0.9), independently of Kiln's readers.
 */
import { cpSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';
import { expectOneLine, kiln, treeDigest, workspace, type Workspace } from './helpers.ts';

const MIRROR = 'instruments/quillon-tarncam/mirror-area.csv';
const SCALE = 0.9;
const SIGN_OFF = ['--accept-all', '--reason', 'planned soft-response change of the demo candidate', '--role', 'calibration lead'];

const spaces: Workspace[] = [];
afterAll(() => spaces.forEach((w) => w.dispose()));

/** The mirror table with every area × SCALE (comments and header kept). */
function scaledMirror(text: string): string {
  return text
    .split('\n')
    .map((l) => {
      if (!/^\d/.test(l)) return l;
      const [e, a] = l.split(',');
      return `${e},${(Number(a) * SCALE).toPrecision(8)}`;
    })
    .join('\n');
}

interface ReportJson {
  release: string;
  checks: { id: string; product: string | null; status: string; measured: unknown; tolerance: unknown }[];
}

describe('correcting a published release', () => {
  it('mirror area corrected in a new release: refused in place, reviewed, signed off, published, old one superseded', () => {
    const ws = workspace();
    spaces.push(ws);
    // The demo's own 2.1.0 (per-node products) also supersedes 2.0.0; the correction takes its id here.
    rmSync(ws.path('releases/2.1.0'), { recursive: true });
    const pub = kiln('publish', '2.0.0', '--content', ws.content, ...ws.cacheArgs, ...SIGN_OFF, '--quiet');
    expect(pub.status, pub.stderr).toBe(0);
    expect(pub.stdout).toMatch(/release 1\.1\.0 marked superseded/);

    // 1. The instrument's table is an input of every published release: editing it is refused.
    const original = ws.read(MIRROR);
    ws.write(MIRROR, scaledMirror(original));
    const refused = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(refused.status).toBe(2);
    const line = expectOneLine(refused.stderr);
    expect(line).toMatch(/inputs of (superseded|published) release \d\.\d\.\d changed since it was published/);
    expect(line).toContain(MIRROR);
    expect(line).toMatch(/restate the corrected ones in a new release \(release\.yaml overrides:/);
    ws.write(MIRROR, original);

    // 2. The correction as a new release.
    cpSync(ws.path('releases/2.0.0'), ws.path('releases/2.1.0'), { recursive: true });
    ws.write('releases/2.1.0/mirror-area-v2.csv', scaledMirror(original));
    const yaml = ws
      .read('releases/2.1.0/release.yaml')
      .replace(/^id: 2\.0\.0$/m, 'id: 2.1.0')
      .replace(/^status: published$/m, 'status: candidate')
      .replace(/^supersedes: 1\.1\.0$/m, 'supersedes: 2.0.0')
      .replace(/^title: .*$/m, 'title: Corrected mirror area')
      .replace(/^date: .*$/m, 'date: 2027-10-30');
    expect(yaml).toMatch(/^id: 2\.1\.0$/m);
    expect(yaml).toMatch(/^status: candidate$/m);
    expect(yaml).toMatch(/^supersedes: 2\.0\.0$/m);
    ws.write('releases/2.1.0/release.yaml', `${yaml}\noverrides:\n  mirrorArea: mirror-area-v2.csv\n`);

    // 3. The report lists the area change for review, with the measured ratio and the allowed band.
    const report = kiln('report', '2.1.0', '--content', ws.content, '--json');
    expect(report.status, report.stderr).toBe(1);
    const rep = JSON.parse(report.stdout) as ReportJson;
    const open = rep.checks.filter((c) => c.status === 'review');
    const areas = open.filter((c) => c.id === 'review.arf.area-ratio');
    // Every ARF of 2.1.0: 2 detectors × 4 epochs (content/releases/2.0.0/release.yaml).
    expect(areas.map((c) => c.product).sort()).toEqual(['bi1-e1-arf', 'bi1-e2-arf', 'bi1-e3-arf', 'bi1-e4-arf', 'fi0-e1-arf', 'fi0-e2-arf', 'fi0-e3-arf', 'fi0-e4-arf']);
    expect(rep.checks.findIndex((c) => c.status === 'pass')).toBeGreaterThan(rep.checks.findIndex((c) => c.status === 'review'));
    // The redistribution did not change: no RMF review item.
    expect(open.filter((c) => c.id.startsWith('review.rmf.'))).toEqual([]);
    const text = kiln('report', '2.1.0', '--content', ws.content);
    expect(text.stdout).toMatch(/^ {2}REVIEW +review\.arf\.area-ratio \[fi0-e1-arf\] +measured 0\.9 ratio, allowed 1 ± 0\.02 ratio: /m);

    // 4. Publishing waits for the sign-off.
    const before = treeDigest(ws.content);
    const waiting = kiln('publish', '2.1.0', '--content', ws.content, ...ws.cacheArgs, '--quiet');
    expect(waiting.status).toBe(1);
    // The area items and what a 10 % lower area does to the reference sources' fitted fluxes and band rates.
    expect(open.some((c) => c.id.startsWith('review.impact.'))).toBe(true);
    expect(open.every((c) => c.id === 'review.arf.area-ratio' || c.id.startsWith('review.impact.'))).toBe(true);
    expect(waiting.stderr).toContain(`release 2.1.0 has ${open.length} review items nobody accepted:`);
    expect(waiting.stderr).toMatch(/--accept-all --reason TEXT/);
    expect(treeDigest(ws.content)).toEqual(before);

    const accepted = open.map((c) => `  - { check: ${c.id}, product: ${c.product}, reason: "mirror area corrected by 10 % (ground re-analysis)", role: instrument scientist }`);
    ws.write('releases/2.1.0/release.yaml', `${ws.read('releases/2.1.0/release.yaml')}accepted:\n${accepted.join('\n')}\n`);
    const yaml200 = ws.read('releases/2.0.0/release.yaml');
    const archive200 = treeDigest(ws.path('archive/2.0.0'));
    const done = kiln('publish', '2.1.0', '--content', ws.content, ...ws.cacheArgs, '--quiet');
    expect(done.status, done.stderr).toBe(0);
    expect(done.stdout).toContain(`with ${open.length} accepted review items recorded`);
    expect(done.stdout).toMatch(/release 2\.0\.0 marked superseded in its release\.yaml \(its archive is unchanged\)/);
    const changed = yaml200
      .split('\n')
      .map((l, i) => [l, ws.read('releases/2.0.0/release.yaml').split('\n')[i]])
      .filter(([a, b]) => a !== b);
    expect(changed).toEqual([['status: published', 'status: superseded']]);
    expect(treeDigest(ws.path('archive/2.0.0'))).toEqual(archive200);
    const seal = JSON.parse(ws.read('archive/2.1.0/seal.json')) as { signOff: { check: string; product: string; role: string; source: string }[]; inputFiles: Record<string, string> };
    expect(seal.signOff.map((x) => `${x.check} ${x.product}`).sort()).toEqual(open.map((c) => `${c.id} ${c.product}`).sort());
    expect(new Set(seal.signOff.map((x) => `${x.role} / ${x.source}`))).toEqual(new Set(['instrument scientist / release.yaml']));
    expect(Object.keys(seal.inputFiles)).toContain('releases/2.1.0/mirror-area-v2.csv');
    expect(Object.keys(seal.inputFiles)).not.toContain(MIRROR);

    // 5. Both served from their archives; the index says who is current.
    const after = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(after.status, after.stderr).toBe(0);
    const index = JSON.parse(readFileSync(join(ws.out, 'index.json'), 'utf8')) as { releases: { id: string; status: string; checks: { accepted?: number } }[] };
    const st = Object.fromEntries(index.releases.map((r) => [r.id, r.status]));
    expect(st).toEqual({ '1.0.0': 'superseded', '1.1.0': 'superseded', '2.0.0': 'superseded', '2.1.0': 'published' });
    expect(index.releases.find((r) => r.id === '2.1.0')!.checks.accepted).toBe(open.length);

    if (runAstropyChecks) {
      const ratio = runPythonJson<{ min: number; max: number }>(
        'astropy',
        `import json, sys, numpy as np
from astropy.io import fits
a, b = json.load(sys.stdin)
old = fits.getdata(a, 'SPECRESP')['SPECRESP'].astype(float)
new = fits.getdata(b, 'SPECRESP')['SPECRESP'].astype(float)
m = old > 0
r = new[m] / old[m]
print(json.dumps({'min': float(r.min()), 'max': float(r.max())}))`,
        [join(ws.out, 'releases/2.0.0/files/quillon-tarncam_fi0_e2_2.0.0.arf.gz'), join(ws.out, 'releases/2.1.0/files/quillon-tarncam_fi0_e2_2.1.0.arf.gz')],
      );
      // SPECRESP is float32 (OGIP CAL/GEN/92-002): ratios agree with 0.9 to float32 precision (~1e-7 relative, ×10 margin).
      expect(Math.abs(ratio.min - SCALE)).toBeLessThan(1e-6);
      expect(Math.abs(ratio.max - SCALE)).toBeLessThan(1e-6);
    }
    // Six builds (publish, refused build, two reports, publish, build), each with its impact fits.
  }, 300_000);

  it('--accept-all needs --reason, and --reason/--role need --accept-all (exit 2, one line)', () => {
    const ws = workspace();
    spaces.push(ws);
    const before = treeDigest(ws.content);
    for (const args of [['--accept-all'], ['--reason', 'x'], ['--role', 'lead']]) {
      const r = kiln('publish', '2.0.0', '--content', ws.content, ...ws.cacheArgs, ...args);
      expect(r.status, args.join(' ')).toBe(2);
      expect(expectOneLine(r.stderr)).toMatch(/--accept-all/);
    }
    expect(treeDigest(ws.content)).toEqual(before);
  });
});
