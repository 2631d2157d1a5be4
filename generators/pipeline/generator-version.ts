/**
 * The generator's version, as a job fingerprint sees it: Kiln's package version plus a digest of
 * every source file under generators/. Any code change gives a new version, so cached bytes and
 * shards are never reused across code that could write different bytes (a version number alone
 * would trust developers to bump it).
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createHash } from 'node:crypto';

const GENERATORS = join(dirname(fileURLToPath(import.meta.url)), '..');
const PACKAGE = join(GENERATORS, '..', 'package.json');
/** Hex digits of the source digest kept in the version string (64 bits: collisions are not a concern). */
const DIGEST_HEX = 16;

let cached: string | null = null;

function sources(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir).sort()) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...sources(p));
    else if (/\.(ts|mjs|js|json)$/.test(name)) out.push(p);
  }
  return out;
}

export function generatorVersion(): string {
  if (cached) return cached;
  const h = createHash('sha256');
  for (const f of sources(GENERATORS)) h.update(relative(GENERATORS, f)).update('\0').update(readFileSync(f)).update('\0');
  const pkg = JSON.parse(readFileSync(PACKAGE, 'utf8')) as { version: string };
  cached = `kiln ${pkg.version}+${h.digest('hex').slice(0, DIGEST_HEX)}`;
  return cached;
}
