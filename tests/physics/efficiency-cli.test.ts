import { afterEach, describe, expect, it, vi } from 'vitest';
import { KilnInputError } from '../../generators/errors.ts';
import { parseArgs, UsageError } from '../../generators/cli/args.ts';
import { command, parseEnergyList, runEfficiency, type InstrumentDetectors } from '../../generators/cli/efficiency.ts';
import { main } from '../../generators/cli/main.ts';
import { efficiencyTable } from '../../generators/physics/index.ts';
import { DEMO_STACK } from './stack-fixture.ts';

const INSTRUMENT: InstrumentDetectors = { detectors: [{ id: 'cam-a', name: 'Camera A (demo)', stack: DEMO_STACK }] };
const load = async () => INSTRUMENT;

async function run(argv: string[]): Promise<string> {
  let out = '';
  const code = await runEfficiency(parseArgs(command, argv), load, (s) => (out += s));
  expect(code).toBe(0);
  return out;
}

afterEach(() => vi.restoreAllMocks());

describe('kiln efficiency', () => {
  it('--json gives every layer with formula, density and thickness, and the same numbers as efficiencyTable', async () => {
    const out = JSON.parse(await run(['--instrument', 'inst.yaml', '--detector', 'cam-a', '--energies', '0.3,1, 6', '--date', '2026-03-01', '--json']));
    const expected = efficiencyTable(DEMO_STACK, Float64Array.of(0.3, 1, 6), '2026-03-01');
    expect(out).toMatchObject({ instrument: 'inst.yaml', detector: 'cam-a', energiesKeV: [0.3, 1, 6] });
    expect(out.components).toEqual(expected.components);
    expect(out.total).toEqual(expected.total);
    for (const c of out.components) {
      expect(typeof c.formula).toBe('string');
      expect(c.densityGcm3).toBeGreaterThan(0);
      expect(c.thicknessUm).toBeGreaterThan(0);
    }
  });

  it('text output names each layer and prints one row per energy with the total', async () => {
    const out = await run(['--instrument', 'inst.yaml', '--detector', 'cam-a', '--energies', '0.5,2', '--date', '2026-03-01']);
    for (const name of ['blocking film', 'blocking metal', 'molecular film', 'oxide', 'gates', 'sensor (absorbed)', 'total']) expect(out).toContain(name);
    expect(out).toContain('C22H10N2O5, 1.42 g/cm³, 0.2 µm');
    const rows = out.trim().split('\n').slice(-2);
    expect(rows[0].trim().startsWith('0.5')).toBe(true);
    expect(rows[1].trim().startsWith('2')).toBe(true);
  });

  it.each(['0.5,abc', '1,,x', '-1', '25', '0.05', '1e', ''])('--energies %j is a usage error naming the value', (list) => {
    expect(() => parseEnergyList(list)).toThrow(UsageError);
    const bad = list.split(',').find((s) => s && !(Number(s) >= 0.1 && Number(s) <= 20));
    if (bad) expect(() => parseEnergyList(list)).toThrow(bad);
  });

  it('unknown detector is an input error listing the ids', async () => {
    const p = runEfficiency(parseArgs(command, ['--instrument', 'i.yaml', '--detector', 'cam-z', '--energies', '1', '--date', '2026-01-01']), load, () => {});
    await expect(p).rejects.toThrow(KilnInputError);
    await expect(p).rejects.toMatchObject({ where: { file: 'i.yaml', value: 'cam-z', expected: 'one of cam-a' } });
  });

  it('missing --date with a contamination layer, and a bad --date, are usage errors', async () => {
    await expect(runEfficiency(parseArgs(command, ['--instrument', 'i', '--detector', 'cam-a', '--energies', '1']), load, () => {})).rejects.toThrow(/--date YYYY-MM-DD is required/);
    await expect(runEfficiency(parseArgs(command, ['--instrument', 'i', '--detector', 'cam-a', '--energies', '1', '--date', '2026-02-30']), load, () => {})).rejects.toThrow(/"2026-02-30" is not a calendar date/);
  });

  it('through kiln main: a bad energy exits 2 with one line naming it', async () => {
    const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    const code = await main(['efficiency', '--instrument', 'x.yaml', '--detector', 'd', '--energies', '1,abc']);
    expect(code).toBe(2);
    expect(String(err.mock.calls[0][0])).toMatch(/^kiln efficiency: --energies: "abc" is not a number/);
  });
});
