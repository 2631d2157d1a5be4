/**
 * kiln: the command line. Each verb lives in its own module (generators/cli/<verb>.ts) and is a
 * thin shell over the library in generators/. Every failure ends as one line on stderr (the stack
 * trace only with --debug) and an exit code from EXIT: 0 ok, 1 findings, 2 bad input/usage,
 * 3 file system (disk full, permission), 4 busy (a lock held), 70 a bug in Kiln.
 */
import { EXIT, exitCodeOf, fromSystemError, isInputError } from '../errors.ts';
import { formatHelp, parseArgs, UsageError, type CommandSpec } from './args.ts';

/** Verb name → module path; loaded lazily so `kiln inspect` does not pay for the physics. */
const VERBS: Record<string, { summary: string; load: () => Promise<{ command: CommandSpec }> }> = {
  build: { summary: 'build every release in the content tree into products, reports and site data', load: () => import('./build.ts') },
  site: { summary: 'build products and the site for a content tree into a folder (--content, --out)', load: () => import('./site.ts') },
  plan: { summary: 'list the jobs of a build with their fingerprints (JSON, for a batch scheduler)', load: () => import('./plan.ts') },
  gather: { summary: 'check the shards of a sharded build and write the output of the whole build', load: () => import('./gather.ts') },
  check: { summary: 'validate RMF, ARF or PHA files (any origin)', load: () => import('./check.ts') },
  compare: { summary: 'compare two releases or two response files', load: () => import('./compare.ts') },
  report: { summary: "print a release's checks, failed and review items first, measured vs allowed", load: () => import('./report.ts') },
  publish: { summary: 'freeze a release: archive its products with checksums', load: () => import('./publish.ts') },
  efficiency: { summary: 'print the layer-by-layer efficiency of a detector', load: () => import('./efficiency.ts') },
  response: { summary: 'make the RMF and ARF of one detector position and date from a release\'s model document', load: () => import('./response.ts') },
  fold: { summary: 'fold a source through a response: expected counts, band rates, pile-up', load: () => import('./fold.ts') },
  simulate: { summary: 'simulate a source spectrum through a response into a PHA file', load: () => import('./simulate.ts') },
  fit: { summary: 'fit a source model to a PHA spectrum (C-statistic, ΔC = 1 errors)', load: () => import('./fit.ts') },
  inspect: { summary: 'print the HDUs, key header values and columns of a FITS file', load: () => import('./inspect.ts') },
};

export function topHelp(): string {
  const w = Math.max(...Object.keys(VERBS).map((k) => k.length));
  return [
    'kiln: build, check and publish response products of X-ray imaging spectrometers',
    '',
    'usage: kiln VERB [options]   (kiln VERB --help for its options)',
    '',
    'verbs:',
    ...Object.entries(VERBS).map(([k, v]) => `  ${k.padEnd(w)}  ${v.summary}`),
  ].join('\n');
}

/** Accepted by every verb: print stack traces of failures. */
export const DEBUG_FLAG = '--debug';

export async function main(argvIn: string[]): Promise<number> {
  const debug = argvIn.includes(DEBUG_FLAG);
  const argv = argvIn.filter((a) => a !== DEBUG_FLAG);
  const [verb, ...rest] = argv;
  if (!verb || verb === '--help' || verb === '-h' || verb === 'help') {
    process.stdout.write(topHelp() + '\n');
    return verb ? 0 : 2;
  }
  const entry = VERBS[verb];
  if (!entry) {
    process.stderr.write(`kiln: unknown verb "${verb}"\n\n${topHelp()}\n`);
    return 2;
  }
  try {
    const { command } = await entry.load();
    if (rest.includes('--help') || rest.includes('-h')) {
      process.stdout.write(formatHelp(command) + '\n');
      return 0;
    }
    const args = parseArgs(command, rest);
    return await command.run(args);
  } catch (e) {
    return reportFailure(verb, e, debug);
  }
}

/** The one error path: one line naming file, what happened and what to do; the trace only with --debug. */
export function reportFailure(verb: string, e: unknown, debug: boolean): number {
  const trace = () => {
    if (debug && e instanceof Error && e.stack) process.stderr.write(e.stack + '\n');
  };
  if (e instanceof UsageError) {
    process.stderr.write(`kiln ${verb}: ${e.message}\n`);
    return EXIT.input;
  }
  const known = isInputError(e) ? e : fromSystemError(e);
  if (known) {
    for (const line of known.lines()) process.stderr.write(`kiln ${verb}: ${line}\n`);
    trace();
    return exitCodeOf(known);
  }
  const msg = e instanceof Error ? `${e.name}: ${e.message}` : String(e);
  process.stderr.write(`kiln ${verb}: internal error: ${firstLine(msg)} — this is a bug in Kiln; run again with ${DEBUG_FLAG} for the stack trace and report it\n`);
  trace();
  return EXIT.internal;
}

function firstLine(s: string): string {
  const line = s.split('\n')[0];
  return line.length > 300 ? line.slice(0, 297) + '...' : line;
}
