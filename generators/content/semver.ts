/**
 * Semantic versions (Semantic Versioning 2.0.0, semver.org) as release ids. Kiln accepts the
 * strict grammar minus build metadata ("+..."): build metadata is ignored by semver precedence, so
 * two releases could tie, and "+" is not safe in URLs. Pre-release identifiers must be lower-case
 * so that ids stay distinct on case-insensitive file systems.
 */

/** semver.org's reference grammar, without the build-metadata part, lower-case pre-release. */
export const SEMVER_RE =
  /^(0|[1-9]\d*)\.(0|[1-9]\d*)\.(0|[1-9]\d*)(?:-((?:0|[1-9]\d*|\d*[a-z-][0-9a-z-]*)(?:\.(?:0|[1-9]\d*|\d*[a-z-][0-9a-z-]*))*))?$/;

export interface Semver {
  major: number;
  minor: number;
  patch: number;
  prerelease: (string | number)[];
}

export function isSemver(s: string): boolean {
  return SEMVER_RE.test(s);
}

/** Parses a release id; null when it is not a strict semantic version. */
export function parseSemver(s: string): Semver | null {
  const m = SEMVER_RE.exec(s);
  if (!m) return null;
  const prerelease = m[4] === undefined ? [] : m[4].split('.').map((p) => (/^\d+$/.test(p) ? Number(p) : p));
  return { major: Number(m[1]), minor: Number(m[2]), patch: Number(m[3]), prerelease };
}

/** Precedence per semver §11: negative when a < b. Throws on invalid input (a programming error). */
export function compareSemver(a: string, b: string): number {
  const x = parseSemver(a);
  const y = parseSemver(b);
  if (!x || !y) throw new Error(`not a semantic version: ${!x ? a : b}`);
  for (const k of ['major', 'minor', 'patch'] as const) if (x[k] !== y[k]) return x[k] - y[k];
  // A version without pre-release outranks one with.
  if (x.prerelease.length === 0 || y.prerelease.length === 0) return y.prerelease.length - x.prerelease.length;
  const n = Math.min(x.prerelease.length, y.prerelease.length);
  for (let i = 0; i < n; i++) {
    const p = x.prerelease[i];
    const q = y.prerelease[i];
    if (p === q) continue;
    if (typeof p === 'number' && typeof q === 'number') return p - q;
    if (typeof p === 'number') return -1; // numeric identifiers rank below alphanumeric ones
    if (typeof q === 'number') return 1;
    return p < q ? -1 : 1;
  }
  return x.prerelease.length - y.prerelease.length;
}
