/**
 * kiln: the command line. Each verb lives in its own module (generators/cli/<verb>.ts) and is a
 * thin shell over the library in generators/. Exit codes: 0 ok, 1 findings, 2 bad input/usage.
 */
import { isInputError } from '../errors.ts';
import { formatHelp, parseArgs, UsageError, type CommandSpec } from './args.ts';

/** Verb name → module path; loaded lazily so `kiln inspect` does not pay for the physics. */
const VERBS: Record<string, { summary: string; load: () => Promise<{ command: CommandSpec }> }> = {
  build: { summary: 'build every release in the content tree into products, reports and site data', load: () => import('./build.ts') },
  site: { summary: 'build products and the site for a content tree into a folder (--content, --out)', load: () => import('./site.ts') },
  check: { summary: 'validate RMF, ARF or PHA files (any origin)', load: () => import('./check.ts') },
  compare: { summary: 'compare two releases or two response files', load: () => import('./compare.ts') },
  report: { summary: "print a release's checks, failed and review items first, measured vs allowed", load: () => import('./report.ts') },
  publish: { summary: 'freeze a release: archive its products with checksums', load: () => import('./publish.ts') },
  efficiency: { summary: 'print the layer-by-layer efficiency of a detector', load: () => import('./efficiency.ts') },
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

export async function main(argv: string[]): Promise<number> {
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
  const { command } = await entry.load();
  if (rest.includes('--help') || rest.includes('-h')) {
    process.stdout.write(formatHelp(command) + '\n');
    return 0;
  }
  try {
    const args = parseArgs(command, rest);
    return await command.run(args);
  } catch (e) {
    if (e instanceof UsageError) {
      process.stderr.write(`kiln ${verb}: ${e.message}\n`);
      return 2;
    }
    if (isInputError(e)) {
      for (const line of e.lines()) process.stderr.write(`kiln ${verb}: ${line}\n`);
      return 2;
    }
    throw e;
  }
}
