/** Runs `node bin/kiln.mjs check ...` from the repository root and returns exit code and output. */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
export const BROKEN = join(ROOT, 'tests', 'fixtures', 'broken');

export interface CliResult {
  status: number | null;
  stdout: string;
  stderr: string;
}

export function kilnCheck(...args: string[]): CliResult {
  const r = spawnSync(process.execPath, [join(ROOT, 'bin', 'kiln.mjs'), 'check', ...args], { cwd: ROOT, encoding: 'utf8' });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}
