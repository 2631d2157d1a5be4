#!/usr/bin/env node
// Thin launcher: registers the TypeScript loader, then hands over to the CLI in generators/.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../generators/cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
