/**
 * kiln check FILE... [--json] [--failures]: validate RMF, ARF or PHA files of any origin.
 * Exit 0: no failed check; 1: at least one failed check; 2: a file is unreadable or bad usage.
 * All files are read before anything is printed, so an unreadable file yields only its one-line
 * reason, never half a report.
 */
import { checkFile, formatReportJson, formatReportText, type FileCheckResult } from '../checks/index.ts';
import { readFitsBytes } from '../node/index.ts';
import { optFlag, type CommandSpec, type ParsedArgs } from './args.ts';

export const command: CommandSpec = {
  name: 'check',
  summary: 'Validate RMF, ARF or PHA files (any origin) against the OGIP layouts and numeric rules. Exit 0 clean, 1 findings, 2 unreadable file or bad usage.',
  usage: 'kiln check FILE... [--json] [--failures]',
  options: [
    { name: 'json', help: 'print a JSON report instead of text' },
    { name: 'failures', help: 'text report: list only checks that did not pass' },
  ],
  positionals: { min: 1, max: Infinity, names: 'FILE...' },
  async run(args: ParsedArgs): Promise<number> {
    const results: FileCheckResult[] = [];
    // readFitsBytes and checkFile throw KilnInputError naming the file; main prints it, exits 2.
    for (const path of args.positionals) results.push(checkFile(readFitsBytes(path), path));
    const text = optFlag(args, 'json') ? formatReportJson(results) : formatReportText(results, { showPassing: !optFlag(args, 'failures') });
    process.stdout.write(text + '\n');
    return results.some((r) => r.checks.some((c) => c.status === 'fail')) ? 1 : 0;
  },
};
