/** kiln publish: thin shell over generators/pipeline/publish.ts. */
import { resolve } from 'node:path';
import { BuildRefused } from '../pipeline/build.ts';
import { publish } from '../pipeline/publish.ts';
import { optFlag, optString, type CommandSpec } from './args.ts';
import { DEFAULT_CONTENT_DIR } from './build.ts';

export const command: CommandSpec = {
  name: 'publish',
  summary: 'Freeze a release: build and check it, then archive its products with their SHA-256 in the content tree (never rewritten).',
  usage: 'kiln publish ID [--content DIR] [--quiet]',
  positionals: { min: 1, max: 1, names: 'ID (the release id)' },
  options: [
    { name: 'content', arg: 'DIR', help: `content tree (default ${DEFAULT_CONTENT_DIR})` },
    { name: 'quiet', help: 'print only the result' },
  ],
  async run(args) {
    const contentDir = resolve(optString(args, 'content') ?? DEFAULT_CONTENT_DIR);
    const log = optFlag(args, 'quiet') ? undefined : (line: string) => process.stderr.write(`kiln publish: ${line}\n`);
    try {
      const r = await publish({ contentDir, id: args.positionals[0], log });
      process.stdout.write(
        (r.resumed
          ? `kiln publish: release ${r.release}: finished an interrupted publish (archive in ${r.archiveDir} verified)`
          : `kiln publish: release ${r.release} frozen: ${r.files} files sealed in ${r.archiveDir}`) +
          (r.statusChanged ? '; release.yaml status set to published' : '') +
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
