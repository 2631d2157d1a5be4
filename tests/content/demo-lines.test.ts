/**
 * The line energies of the demo (facts of physics, scripts/demo-truth.ts) against xraylib
 * (Debian python3-xraylib): Kα as the radiative-rate-weighted mean of KL3 and KL2, Kβ1 and Lα1 as
 * tabulated. In CI a missing xraylib fails the test.
 */
import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { requirePython, runXraylibChecks } from '../support/python.ts';
import { LINE_ENERGIES_KEV } from '../../scripts/demo-truth.ts';

/** Half a unit of the 4th decimal written in the table, plus 0.1 eV for xraylib version drift. */
const TOLERANCE_KEV = 0.00015;

const SCRIPT = `
import json, xraylib as x
Z = {'C':6,'O':8,'F':9,'Al':13,'Si':14,'Ag':47,'Ti':22,'Mn':25,'Ni':28,'Cu':29}
out = {}
for name in json.loads(input()):
    el, line = name.split()
    z = Z[el]
    if line == 'Ka':
        e1, e2 = x.LineEnergy(z, x.KL3_LINE), x.LineEnergy(z, x.KL2_LINE)
        r1, r2 = x.RadRate(z, x.KL3_LINE), x.RadRate(z, x.KL2_LINE)
        out[name] = (e1 * r1 + e2 * r2) / (r1 + r2)
    elif line == 'Kb':
        out[name] = x.LineEnergy(z, x.KB1_LINE)
    elif line == 'La1':
        out[name] = x.LineEnergy(z, x.LA1_LINE)
print(json.dumps(out))
`;

describe.runIf(runXraylibChecks)('demo line energies', () => {
  it('match xraylib', () => {
    const py = requirePython('xraylib');
    const names = Object.keys(LINE_ENERGIES_KEV);
    const ref = JSON.parse(execFileSync(py, ['-c', SCRIPT], { input: JSON.stringify(names) + '\n', encoding: 'utf8' })) as Record<string, number>;
    for (const n of names) expect(Math.abs(LINE_ENERGIES_KEV[n as keyof typeof LINE_ENERGIES_KEV] - ref[n]), n).toBeLessThan(TOLERANCE_KEV);
  });
});
