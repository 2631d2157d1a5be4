#!/usr/bin/env node
// Thin launcher: runs the CLI in generators/, from one prebuilt script of its sources when it can
// (bin/cli-bundle.mjs: a fraction of the start-up), else through the TypeScript loader.
// KILN_FROM_SOURCES=1 always takes the loader.
import { bundledCli } from './cli-bundle.mjs';

const bundle = process.env.KILN_FROM_SOURCES === '1' ? null : await bundledCli();
let cli = null;
if (bundle) {
  try {
    cli = await import(bundle.href);
  } catch {
    // Removed meanwhile by another checkout's launcher, say: the sources run the same code.
    cli = null;
  }
}
if (!cli) {
  const { register } = await import('tsx/esm/api');
  register();
  cli = await import('../generators/cli/main.ts');
}
const { main, reportFailure } = cli;
const verb = process.argv[2] ?? '';
const debug = process.argv.includes('--debug');
// A failure outside the awaited path (a stream or worker event) still ends as one line.
for (const event of ['uncaughtException', 'unhandledRejection'])
  process.on(event, (e) => {
    process.exit(reportFailure(verb, e, debug));
  });
process.exitCode = await main(process.argv.slice(2));
