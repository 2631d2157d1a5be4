/**
 * Semantic versions (Semantic Versioning 2.0.0, semver.org) as release ids. Kiln accepts the
 * strict grammar minus build metadata ("+..."): build metadata is ignored by semver precedence, so
 * two releases could tie, and "+" is not safe in URLs. Pre-release identifiers must be lower-case
 * so that ids stay distinct on case-insensitive file systems.
 */

/** semver.org's reference grammar, without the build-metadata part, lower-case pre-release. */
export const SEMVER_RE =
  /^(0|[1-9]\d*)\.(0|[1-9]\d*)\.(0|[1-9]\d*)(?:-((?:0|[1-9]\d*|\d*[a-z-][0-9a-z-]*)(?:\.(?:0|[1-9]\d*|\d*[a-z-][0-9a-z-]*))*))?$/;

/** Numeric parts are BigInt: semver puts no bound on them, and above 2^53 Numbers would tie or misorder. */
export interface Semver {
  major: bigint;
  minor: bigint;
  patch: bigint;
  prerelease: (string | bigint)[];
}

export function isSemver(s: string): boolean {
  return SEMVER_RE.test(s);
}

/** Parses a release id; null when it is not a strict semantic version. */
export function parseSemver(s: string): Semver | null {
  const m = SEMVER_RE.exec(s);
  if (!m) return null;
  const prerelease = m[4] === undefined ? [] : m[4].split('.').map((p) => (/^\d+$/.test(p) ? BigInt(p) : p));
  return { major: BigInt(m[1]), minor: BigInt(m[2]), patch: BigInt(m[3]), prerelease };
}

/** Precedence per semver §11: negative when a < b. Throws on invalid input (a programming error). */
export function compareSemver(a: string, b: string): number {
  const x = parseSemver(a);
  const y = parseSemver(b);
  if (!x || !y) throw new Error(`not a semantic version: ${!x ? a : b}`);
  for (const k of ['major', 'minor', 'patch'] as const) if (x[k] !== y[k]) return x[k] < y[k] ? -1 : 1;
  // A version without pre-release outranks one with.
  if (x.prerelease.length === 0 || y.prerelease.length === 0) return y.prerelease.length - x.prerelease.length;
  const n = Math.min(x.prerelease.length, y.prerelease.length);
  for (let i = 0; i < n; i++) {
    const p = x.prerelease[i];
    const q = y.prerelease[i];
    if (p === q) continue;
    if (typeof p === 'bigint' && typeof q === 'bigint') return p < q ? -1 : 1;
    if (typeof p === 'bigint') return -1; // numeric identifiers rank below alphanumeric ones
    if (typeof q === 'bigint') return 1;
    return p < q ? -1 : 1;
  }
  return x.prerelease.length - y.prerelease.length;
}
