/** kiln report ID: a release's checks, what needs action first, measured against allowed. */
import { formatReleaseReport, sortForReport } from '../checks/index.ts';
import { releaseChecks } from '../pipeline/release-checks.ts';
import { optFlag, optString, type CommandSpec } from './args.ts';
import { DEFAULT_CONTENT_DIR } from './build.ts';

export const command: CommandSpec = {
  name: 'report',
  summary:
    "Print a release's checks: failed, then open review items, warnings and accepted items, each with the measured and the allowed value. Builds in a private temporary folder; writes nothing. Exit 0 nothing open, 1 failed checks or open review items, 2 bad input.",
  usage: 'kiln report ID [--content DIR] [--all] [--json]',
  positionals: { min: 1, max: 1, names: 'ID (the release id, or INSTRUMENT~ID when two instruments use it)' },
  options: [
    { name: 'content', arg: 'DIR', help: `content tree (default ${DEFAULT_CONTENT_DIR})` },
    { name: 'all', help: 'text report: list passing checks too' },
    { name: 'json', help: 'print JSON (kiln/release-report/1) instead of text' },
  ],
  async run(args) {
    const id = args.positionals[0];
    const o = await releaseChecks({ contentDir: optString(args, 'content') ?? DEFAULT_CONTENT_DIR, id });
    if (optFlag(args, 'json'))
      process.stdout.write(
        JSON.stringify({ schema: 'kiln/release-report/1', release: o.id, status: o.status, source: o.source, counts: o.checks, checks: sortForReport(o.all) }, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n',
      );
    else process.stdout.write(formatReleaseReport(`release ${o.id} (${o.status}${o.source === 'archive' ? ', from its archive' : ''})`, o.all, { passing: optFlag(args, 'all') }) + '\n');
    return o.failures.length || o.reviews.length ? 1 : 0;
  },
};
