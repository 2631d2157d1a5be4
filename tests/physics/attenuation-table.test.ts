import { execFileSync } from 'node:child_process';
import { readFileSync, statSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { TABLE_PROVENANCE } from '../../generators/physics/index.ts';
import { requirePython, runXraylibChecks } from '../support/python.ts';
import { xraylibMap } from './xraylib-ref.ts';

const TABLE = new URL('../../generators/physics/data/xray-elements.ts', import.meta.url);
const SCRIPT = new URL('../../scripts/import-xraylib.py', import.meta.url);

describe('the committed element table', () => {
  it('carries its provenance and stays under 1.5 MB', () => {
    expect(TABLE_PROVENANCE.library).toMatch(/xraylib/);
    expect(TABLE_PROVENANCE.generated).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    expect(TABLE_PROVENANCE.functions).toContain('CS_Photo');
    expect(TABLE_PROVENANCE.maxInterpolationError).toBeLessThan(0.005);
    expect(statSync(TABLE).size).toBeLessThan(1.5e6);
  });

  describe.runIf(runXraylibChecks)('against the installed xraylib (Debian python3-xraylib)', () => {
    it('was made by this xraylib version', () => {
      const [version] = xraylibMap<null, string>("getattr(xrl, '__version__', 'unknown')", [null]);
      expect(TABLE_PROVENANCE.libraryVersion).toBe(version);
    });

    it('is exactly what the import script produces today (rerun is byte-identical)', () => {
      const py = requirePython('xraylib');
      const fresh = execFileSync(py, [SCRIPT.pathname, '--generated', TABLE_PROVENANCE.generated], { encoding: 'utf8', maxBuffer: 64 << 20 });
      expect(fresh === readFileSync(TABLE, 'utf8')).toBe(true);
    });
  });
});
