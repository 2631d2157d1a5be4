/**
 * Build-time access to the build's output (the only source of numbers for the pages).
 * DIR = KILN_OUT or .kiln/out, relative to the project root.
 */
import { existsSync, readFileSync } from 'node:fs';
import { resolve, join } from 'node:path';
import type { ReleaseIndex, ReleaseManifest, ReleaseSite, ValidationReport } from '../../generators/site-data/types.ts';

export const outDir = (): string => resolve(process.env.KILN_OUT ?? '.kiln/out');

const cache = new Map<string, unknown>();

function readJson<T>(path: string, schema: string): T {
  const hit = cache.get(path);
  if (hit) return hit as T;
  if (!existsSync(path))
    throw new Error(`site: ${path} not found. Run \`kiln build\` first (or set KILN_OUT to a build output directory).`);
  let v: { schema?: unknown };
  try {
    v = JSON.parse(readFileSync(path, 'utf8'));
  } catch (e) {
    throw new Error(`site: ${path} is not valid JSON (${(e as Error).message})`);
  }
  if (v.schema !== schema) throw new Error(`site: ${path}: schema is ${JSON.stringify(v.schema)}, expected "${schema}"`);
  cache.set(path, v);
  return v as T;
}

export const loadIndex = (): ReleaseIndex => readJson(join(outDir(), 'index.json'), 'kiln/release-index/1');
export const loadSite = (id: string): ReleaseSite => readJson(join(outDir(), 'releases', id, 'site.json'), 'kiln/release-site/1');
export const loadManifest = (id: string): ReleaseManifest => readJson(join(outDir(), 'releases', id, 'manifest.json'), 'kiln/release-manifest/1');
export const loadValidation = (id: string): ValidationReport => readJson(join(outDir(), 'releases', id, 'validation.json'), 'kiln/validation/1');

/** A release's model document (kiln/model/1), when the build wrote one. */
export const loadModel = (id: string): import('../../generators/model/types.ts').ModelDocument | null =>
  existsSync(join(outDir(), 'releases', id, 'model.json')) ? readJson(join(outDir(), 'releases', id, 'model.json'), 'kiln/model/1') : null;
