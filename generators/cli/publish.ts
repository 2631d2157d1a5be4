/** kiln publish: thin shell over generators/pipeline/publish.ts. */
import { resolve } from 'node:path';
import { BuildRefused } from '../pipeline/build.ts';
import { publish } from '../pipeline/publish.ts';
import { plural } from '../plural.ts';
import { optFlag, optString, UsageError, type CommandSpec } from './args.ts';

/** Role recorded for --accept-all without --role. */
const DEFAULT_ROLE = 'publisher';
import { DEFAULT_CONTENT_DIR } from './build.ts';

export const command: CommandSpec = {
  name: 'publish',
  summary: 'Freeze a release: build and check it, then archive its products with their SHA-256 in the content tree (never rewritten).',
  usage: 'kiln publish ID [--content DIR] [--cache DIR] [--accept-all --reason TEXT [--role TEXT]] [--quiet]',
  positionals: { min: 1, max: 1, names: 'ID (the release id, or INSTRUMENT~ID when two instruments use it)' },
  options: [
    { name: 'content', arg: 'DIR', help: `content tree (default ${DEFAULT_CONTENT_DIR})` },
    { name: 'cache', arg: 'DIR', help: 'job cache of an earlier build (e.g. .kiln/cache): unchanged jobs reuse its verified outputs (default: every job is built)' },
    { name: 'accept-all', help: 'accept every review item release.yaml does not accept (needs --reason); recorded in the seal' },
    { name: 'reason', arg: 'TEXT', help: 'why the review items are accepted (with --accept-all)' },
    { name: 'role', arg: 'TEXT', help: `who accepts them, by role (with --accept-all; default "${DEFAULT_ROLE}")` },
    { name: 'quiet', help: 'print only the result' },
  ],
  async run(args) {
    const contentDir = resolve(optString(args, 'content') ?? DEFAULT_CONTENT_DIR);
    const log = optFlag(args, 'quiet') ? undefined : (line: string) => process.stderr.write(`kiln publish: ${line}\n`);
    const all = optFlag(args, 'accept-all');
    const reason = optString(args, 'reason')?.trim();
    const role = optString(args, 'role')?.trim();
    if (all && !reason) throw new UsageError('--accept-all needs --reason TEXT (why the review items are accepted; recorded in the seal)');
    if (!all && (reason !== undefined || role !== undefined)) throw new UsageError('--reason and --role go with --accept-all (or list accepted items in release.yaml)');
    if (role === '') throw new UsageError('--role needs a non-empty TEXT');
    try {
      const cache = optString(args, 'cache');
      const r = await publish({ contentDir, id: args.positionals[0], log, cacheDir: cache === undefined ? undefined : resolve(cache), acceptAll: all ? { reason: reason!, role: role ?? DEFAULT_ROLE } : undefined });
      process.stdout.write(
        (r.resumed
          ? `kiln publish: release ${r.release}: finished an interrupted publish (archive in ${r.archiveDir} verified)`
          : `kiln publish: release ${r.release} frozen: ${plural(r.files, 'file')} sealed in ${r.archiveDir}`) +
          (r.accepted ? `, with ${plural(r.accepted, 'accepted review item')} recorded` : '') +
          (r.statusChanged ? '; release.yaml status set to published' : '') +
          (r.superseded ? `; release ${r.superseded} marked superseded in its release.yaml (its archive is unchanged)` : '') +
          '\n',
      );
      return 0;
    } catch (e) {
      if (e instanceof BuildRefused) {
        process.stderr.write(`kiln publish: refused, nothing archived:\n${e.message}\n`);
        return 1;
      }
      throw e;
    }
  },
};
