import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { main } from '../../generators/cli/main.ts';
import { efficiencyTable } from '../../generators/physics/index.ts';
import { DEMO_STACK } from './stack-fixture.ts';

// An invented instrument of the fictional demo mission, written the way content/ states it.
const YAML = `id: demo-imager
telescope: DEMOSAT
instrument: DEMOCAM
title: Demo imager
description: Invented instrument for tests.
channels: { count: 1024, firstChannel: 0, widthEv: 10, originEv: 0 }
energyGrid: { minKeV: 0.2, maxKeV: 12, bins: 100, spacing: log }
detectors:
  - id: cam-a
    name: Camera A
    kind: front-illuminated CCD
    description: Invented.
    stack: ${JSON.stringify({
      filters: DEMO_STACK.filters.map(({ kind: _k, ...l }) => l),
      contamination: DEMO_STACK.contamination,
      surface: DEMO_STACK.surface.map(({ kind: _k, ...l }) => l),
      sensor: DEMO_STACK.sensor,
    })}
    redistribution:
      pairEnergyEv: 3.65
      thresholdKeV: 0.1
      fwhm: { source: law, readNoiseE: 3, fano: 0.118, sigma0Ev: 0, pixelsPerEvent: { a: 1, bPerKeV: 0 } }
      centroid: { source: law, gainError: 0, offsetEv: 0, chargeLossEv: 0, chargeLossScaleKeV: 1 }
      tail: { source: law, fractionAtZero: 0.05, fractionScaleKeV: 1, tailScaleEv: 50 }
      shelf: { source: law, fraction: 0.01 }
      escape: true
`;
const CSV = 'energy_keV,area_cm2\n0.1,100\n1,400\n5,300\n15,50\n';

const dir = mkdtempSync(join(tmpdir(), 'kiln-eff-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const file = join(dir, 'instrument.yaml');
writeFileSync(file, YAML);
writeFileSync(join(dir, 'mirror-area.csv'), CSV);

describe('kiln efficiency on an instrument file (through generators/content)', () => {
  it('prints the same table as efficiencyTable for the detector', async () => {
    let out = '';
    const so = vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((out += String(s)), true));
    const se = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    const code = await main(['efficiency', '--instrument', file, '--detector', 'cam-a', '--energies', '0.3,1.5,6', '--date', '2026-05-01', '--json']);
    const errText = se.mock.calls.map((c) => String(c[0])).join('');
    so.mockRestore();
    se.mockRestore();
    expect(errText).toBe('');
    expect(code).toBe(0);
    const got = JSON.parse(out);
    const want = efficiencyTable(DEMO_STACK, Float64Array.of(0.3, 1.5, 6), '2026-05-01');
    expect(got.components).toEqual(want.components);
    expect(got.total).toEqual(want.total);
  });

  it('an unknown detector exits 2 naming the file and the known ids', async () => {
    const se = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    const code = await main(['efficiency', '--instrument', file, '--detector', 'nope', '--energies', '1', '--date', '2026-05-01']);
    const msg = String(se.mock.calls[0]?.[0]);
    se.mockRestore();
    expect(code).toBe(2);
    expect(msg).toContain(file);
    expect(msg).toContain('one of cam-a');
  });
});
