/**
 * The CLI launcher (bin/kiln.mjs, bin/cli-bundle.mjs): a command run from the prebuilt script of
 * the sources prints exactly what the same command prints through the TypeScript loader, paths
 * found from `import.meta.url` included (a plan's generator version is a digest of the files
 * under generators/, found from that module's own URL); a damaged cached script is never run but
 * made again; the cached script is named by the digest of the sources on disk.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { KILN, REPO } from '../pipeline/helpers.ts';

const CACHE = join(REPO, 'node_modules', '.cache', 'kiln-cli');
const run = (args: string[], env: Record<string, string> = {}) => spawnSync(process.execPath, [KILN, ...args], { cwd: REPO, encoding: 'utf8', env: { ...process.env, ...env } });

async function cachedFile(): Promise<string> {
  const { sourceDigest } = (await import(join(REPO, 'bin', 'cli-bundle.mjs'))) as { sourceDigest: () => string };
  return join(CACHE, `cli-${sourceDigest().slice(0, 16)}.mjs`);
}

describe('CLI launcher', () => {
  it('the prebuilt script and the loader give the same plan of the demo content (same generator digest, fingerprints)', () => {
    const bundled = run(['plan', '--content', join(REPO, 'content')]);
    const loader = run(['plan', '--content', join(REPO, 'content')], { KILN_FROM_SOURCES: '1' });
    expect(bundled.status, bundled.stderr).toBe(0);
    expect(loader.status, loader.stderr).toBe(0);
    expect(JSON.parse(bundled.stdout).generator).toMatch(/^kiln \d+\.\d+\.\d+\+[0-9a-f]{16}$/);
    expect(bundled.stdout).toBe(loader.stdout);
  });

  it('the cached script carries the SHA-256 of its body; a damaged one is made again, never run', async () => {
    expect(run(['--help']).status).toBe(0);
    const file = await cachedFile();
    expect(existsSync(file)).toBe(true);
    const text = readFileSync(file, 'utf8');
    const nl = text.indexOf('\n');
    expect(text.slice(0, nl)).toBe(`// kiln cli bundle sha256:${createHash('sha256').update(text.slice(nl + 1)).digest('hex')}`);
    // A planted change that would make every command fail if it ran.
    writeFileSync(file, text.slice(0, nl + 1) + 'throw new Error("damaged bundle ran");\n' + text.slice(nl + 1));
    const r = run(['check', '--help']);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).not.toMatch(/damaged bundle ran/);
    expect(readFileSync(file, 'utf8')).toBe(text);
  });
});
