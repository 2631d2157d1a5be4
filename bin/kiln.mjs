#!/usr/bin/env node
// Thin launcher: registers the TypeScript loader, then hands over to the CLI in generators/.
import { register } from 'tsx/esm/api';

register();
const { main, reportFailure } = await import('../generators/cli/main.ts');
const verb = process.argv[2] ?? '';
const debug = process.argv.includes('--debug');
// A failure outside the awaited path (a stream or worker event) still ends as one line.
for (const event of ['uncaughtException', 'unhandledRejection'])
  process.on(event, (e) => {
    process.exit(reportFailure(verb, e, debug));
  });
process.exitCode = await main(process.argv.slice(2));
