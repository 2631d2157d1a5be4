/** kiln compare: thin shell over generators/pipeline/compare-releases.ts and generators/compare/. */
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { formatCompareText, formatImpactText, needsReview } from '../compare/index.ts';
import { loadContent } from '../content/index.ts';
import { KilnInputError } from '../errors.ts';
import { compareFiles, compareImpact, compareReleases, comparedKeys } from '../pipeline/compare-releases.ts';
import type { ReleaseSpectral } from '../site-data/types.ts';
import { optFlag, optString, UsageError, type CommandSpec } from './args.ts';
import { DEFAULT_OUT_DIR } from './build.ts';

export const command: CommandSpec = {
  name: 'compare',
  summary:
    'Compare two releases (ids, from a build) or two RMF/ARF files: effective-area ratios and differences of width, centroid and row sums per energy, and parameter changes. Exit 0 when every difference is within the review tolerances, 1 when some need review, 2 on bad input.',
  usage: 'kiln compare A B [--out DIR] [--json] [--impact [--content DIR]]',
  positionals: { min: 2, max: 2, names: 'A B (two release ids or two files)' },
  options: [
    { name: 'out', arg: 'DIR', help: `build output holding the releases (default ${DEFAULT_OUT_DIR})` },
    { name: 'json', help: 'print the report as JSON (schema kiln/compare/1)' },
    { name: 'impact', help: "also fit the instrument's reference sources simulated with B's responses with both releases' (releases only; seconds per source)" },
    { name: 'content', arg: 'DIR', help: 'content tree holding the reference sources, with --impact (default content)' },
  ],
  async run(args) {
    const [a, b] = args.positionals;
    // Release ids never hold a path separator or a FITS suffix; such an argument is a file, so a
    // missing one is reported as a file that cannot be read, not as an unknown release.
    const looksLikeFile = (x: string): boolean => /[\\/]|\.(fits|rmf|arf|rsp|pha|pi)(\.gz)?$/i.test(x);
    const asFiles = (looksLikeFile(a) || looksLikeFile(b)) || (existsSync(a) && existsSync(b) && !/^\d+\.\d+\.\d+/.test(a));
    const impact = optFlag(args, 'impact');
    if (impact && asFiles) throw new UsageError('--impact compares two releases (ids from a build), not two files');
    if (!impact && optString(args, 'content') !== undefined) throw new UsageError('--content goes with --impact');
    const outDir = resolve(optString(args, 'out') ?? DEFAULT_OUT_DIR);
    const report = asFiles ? compareFiles(a, b) : compareReleases(outDir, a, b);
    let spectral: ReleaseSpectral | null = null;
    if (impact) {
      const content = await loadContent(resolve(optString(args, 'content') ?? 'content'));
      const [ka, kb] = comparedKeys(outDir, a, b);
      const rel = content.releases.find((r) => r.release.key === kb) ?? content.releases.find((r) => r.release.key === ka);
      if (!rel) throw new KilnInputError(`neither release ${a} nor ${b} is in the content tree`, { file: content.root, expected: 'the content tree the build was made from (--content DIR)' });
      spectral = compareImpact(outDir, rel.instrument, a, b, (line) => process.stderr.write(`kiln compare: ${line}\n`));
    }
    const replacer = (_k: string, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v);
    if (optFlag(args, 'json')) process.stdout.write(JSON.stringify(spectral ? { ...report, impact: spectral } : report, replacer, 2) + '\n');
    else process.stdout.write(formatCompareText(report) + '\n' + (spectral ? formatImpactText(spectral) + '\n' : ''));
    const impactReview = spectral !== null && spectral.impact.some((im) => im.parameters.some((p) => p.review) || im.bands.some((x) => x.review));
    return needsReview(report) || impactReview ? 1 : 0;
  },
};
