/** kiln compare: thin shell over generators/pipeline/compare-releases.ts and generators/compare/. */
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { formatCompareText, needsReview } from '../compare/index.ts';
import { compareFiles, compareReleases } from '../pipeline/compare-releases.ts';
import { optFlag, optString, type CommandSpec } from './args.ts';
import { DEFAULT_OUT_DIR } from './build.ts';

export const command: CommandSpec = {
  name: 'compare',
  summary:
    'Compare two releases (ids, from a build) or two RMF/ARF files: effective-area ratios and differences of width, centroid and row sums per energy, and parameter changes. Exit 0 when every difference is within the review tolerances, 1 when some need review, 2 on bad input.',
  usage: 'kiln compare A B [--out DIR] [--json]',
  positionals: { min: 2, max: 2, names: 'A B (two release ids or two files)' },
  options: [
    { name: 'out', arg: 'DIR', help: `build output holding the releases (default ${DEFAULT_OUT_DIR})` },
    { name: 'json', help: 'print the report as JSON (schema kiln/compare/1)' },
  ],
  async run(args) {
    const [a, b] = args.positionals;
    // Release ids never hold a path separator or a FITS suffix; such an argument is a file, so a
    // missing one is reported as a file that cannot be read, not as an unknown release.
    const looksLikeFile = (x: string): boolean => /[\\/]|\.(fits|rmf|arf|rsp|pha|pi)(\.gz)?$/i.test(x);
    const asFiles = (looksLikeFile(a) || looksLikeFile(b)) || (existsSync(a) && existsSync(b) && !/^\d+\.\d+\.\d+/.test(a));
    const report = asFiles ? compareFiles(a, b) : compareReleases(resolve(optString(args, 'out') ?? DEFAULT_OUT_DIR), a, b);
    process.stdout.write(optFlag(args, 'json') ? JSON.stringify(report, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n' : formatCompareText(report) + '\n');
    return needsReview(report) ? 1 : 0;
  },
};
