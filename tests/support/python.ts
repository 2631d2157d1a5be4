/**
 * Access to the Debian reference libraries (python3-astropy, python3-xraylib, python3-scipy) for tests.
 * They live in the system interpreter, not in any pyenv/virtualenv one on PATH.
 * In CI (CI=true) a missing library is a failure, never a skip.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

/** The reference libraries tests may call. */
export type ReferenceModule = 'astropy' | 'xraylib' | 'scipy';

const CANDIDATES = ['/usr/bin/python3', 'python3'];

function probe(py: string, module: string): boolean {
  const r = spawnSync(py, ['-c', `import ${module}`], { encoding: 'utf8' });
  return r.status === 0;
}

/** Path of a python interpreter that imports `module`, or null. */
export function pythonWith(module: string): string | null {
  for (const py of CANDIDATES) {
    if (py.startsWith('/') && !existsSync(py)) continue;
    if (probe(py, module)) return py;
  }
  return null;
}

/**
 * Returns a python that has `module`. Throws (so the test fails) when absent in CI; outside CI
 * the caller may choose to skip, and the skip is reported by vitest as a skip, not a pass.
 */
export function requirePython(module: ReferenceModule): string {
  const py = pythonWith(module);
  if (!py) throw new Error(`python module ${module} not found (install Debian's python3-${module})`);
  return py;
}

export const haveAstropy = pythonWith('astropy') !== null;
export const haveXraylib = pythonWith('xraylib') !== null;
/** Reference checks run whenever the library is present, and always in CI (where absence fails). */
export const runAstropyChecks = haveAstropy || process.env.CI === 'true';
export const runXraylibChecks = haveXraylib || process.env.CI === 'true';
export const haveScipy = pythonWith('scipy') !== null;
export const runScipyChecks = haveScipy || process.env.CI === 'true';

/** Runs a python snippet with JSON on stdin, returns parsed JSON from stdout. */
export function runPythonJson<T = unknown>(module: ReferenceModule, code: string, input: unknown = null): T {
  const py = requirePython(module);
  const out = execFileSync(py, ['-c', code], {
    input: JSON.stringify(input),
    encoding: 'utf8',
    maxBuffer: 256 * 1024 * 1024,
  });
  return JSON.parse(out) as T;
}
