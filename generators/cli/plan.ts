/** kiln plan: thin shell over generators/pipeline/plan.ts. */
import { resolve } from 'node:path';
import { writeFileDurable } from '../pipeline/atomic.ts';
import { makePlan } from '../pipeline/plan.ts';
import { optString, type CommandSpec } from './args.ts';
import { DEFAULT_CONTENT_DIR } from './build.ts';

export const command: CommandSpec = {
  name: 'plan',
  summary:
    'List the jobs a build of the content tree runs, each with its input fingerprint, as a JSON plan (schema kiln/plan/1) for a batch scheduler; shard K of N runs jobs K, K+N, K+2N… of the list.',
  usage: 'kiln plan [--content DIR] [--out FILE]',
  positionals: { min: 0, max: 0, names: '' },
  options: [
    { name: 'content', arg: 'DIR', help: `content tree to plan (default ${DEFAULT_CONTENT_DIR})` },
    { name: 'out', arg: 'FILE', help: 'write the plan to FILE (atomically) instead of standard output' },
  ],
  async run(args) {
    const { plan } = await makePlan(resolve(optString(args, 'content') ?? DEFAULT_CONTENT_DIR));
    const text = JSON.stringify(plan, null, 2) + '\n';
    const out = optString(args, 'out');
    if (out === undefined) process.stdout.write(text);
    else {
      writeFileDurable(resolve(out), text);
      process.stderr.write(`kiln plan: ${plan.jobs.length} jobs planned (plan ${plan.planSha256.slice(0, 12)}), written to ${out}\n`);
    }
    return 0;
  },
};
