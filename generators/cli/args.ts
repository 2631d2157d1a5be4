/** A small, strict option parser shared by every kiln verb: unknown options are usage errors. */
export interface OptionSpec {
  /** Long name without dashes, e.g. "detector". */
  name: string;
  /** Placeholder of the value ("ID", "FILE"); absent for a boolean flag. */
  arg?: string;
  help: string;
  repeatable?: boolean;
}

export interface CommandSpec {
  name: string;
  summary: string;
  /** e.g. "kiln inspect FILE" */
  usage: string;
  options: OptionSpec[];
  /** Positional arguments: min and max count (max Infinity for "FILE..."). */
  positionals: { min: number; max: number; names: string };
  run(args: ParsedArgs): Promise<number>;
}

export interface ParsedArgs {
  positionals: string[];
  /** Single-valued options keep the last value; repeatable ones collect all. */
  options: Record<string, string | boolean | string[]>;
}

export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export function parseArgs(spec: CommandSpec, argv: string[]): ParsedArgs {
  const out: ParsedArgs = { positionals: [], options: {} };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--') {
      out.positionals.push(...argv.slice(i + 1));
      break;
    }
    if (a.startsWith('--')) {
      const eq = a.indexOf('=');
      const name = eq >= 0 ? a.slice(2, eq) : a.slice(2);
      const opt = spec.options.find((o) => o.name === name);
      if (!opt) throw new UsageError(`unknown option --${name} for "kiln ${spec.name}" (see kiln ${spec.name} --help)`);
      if (!opt.arg) {
        if (eq >= 0) throw new UsageError(`option --${name} takes no value`);
        out.options[name] = true;
        continue;
      }
      let value: string | undefined;
      if (eq >= 0) value = a.slice(eq + 1);
      else value = argv[++i];
      if (value === undefined) throw new UsageError(`option --${name} needs a value ${opt.arg}`);
      if (opt.repeatable) {
        const prev = out.options[name];
        out.options[name] = [...(Array.isArray(prev) ? prev : []), value];
      } else out.options[name] = value;
      continue;
    }
    out.positionals.push(a);
  }
  const { min, max, names } = spec.positionals;
  if (out.positionals.length < min) throw new UsageError(`missing ${names}; usage: ${spec.usage}`);
  if (out.positionals.length > max) throw new UsageError(`too many arguments; usage: ${spec.usage}`);
  return out;
}

export function optString(args: ParsedArgs, name: string): string | undefined {
  const v = args.options[name];
  return typeof v === 'string' ? v : undefined;
}

export function optFlag(args: ParsedArgs, name: string): boolean {
  return args.options[name] === true;
}

export function formatHelp(spec: CommandSpec): string {
  const lines = [`${spec.summary}`, '', `usage: ${spec.usage}`];
  if (spec.options.length) {
    lines.push('', 'options:');
    const rows = spec.options.map((o) => [`--${o.name}${o.arg ? ' ' + o.arg : ''}`, o.help]);
    const w = Math.max(...rows.map((r) => r[0].length), 6);
    for (const [a, h] of rows) lines.push(`  ${a.padEnd(w)}  ${h}`);
  }
  lines.push(`  ${'--help'.padEnd(Math.max(...spec.options.map((o) => `--${o.name}${o.arg ? ' ' + o.arg : ''}`.length), 6))}  show this help`);
  return lines.join('\n');
}
