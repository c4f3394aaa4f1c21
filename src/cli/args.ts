/**
 * A small hand-written argument parser. Each subcommand declares its options once (name, value
 * placeholder, allowed values, help text); the parser and the help screens both read that list.
 *
 * Accepted forms: `--name value`, `--name=value`, flags `--name`, positionals anywhere, and `--`
 * after which everything is positional. An option given twice is a usage error unless repeatable.
 */

export class UsageError extends Error {
  override readonly name = 'UsageError';
  constructor(
    message: string,
    /** The subcommand whose help to point at, if any. */
    readonly command?: string,
  ) {
    super(message);
  }
}

export interface OptionSpec {
  /** Without the leading dashes: `label`, `no-header`. */
  name: string;
  /** Placeholder shown in help for an option that takes a value (`COL`, `FILE`); absent for a flag. */
  value?: string;
  /** The only values accepted, when the set is closed (read from src/core/types.ts constants). */
  values?: readonly string[];
  /** Checks an open value; returns a message saying what is expected, or null when fine. */
  check?: (value: string) => string | null;
  /** Whether the option may be given more than once (values collected in order). */
  repeatable?: boolean;
  describe: string;
}

export interface ParsedArgs {
  positionals: string[];
  /** Option name → values in the order given (one entry for a non-repeatable option). */
  values: Map<string, string[]>;
  flags: Set<string>;
}

/** The single value of an option, or undefined when it was not given. */
export function valueOf(args: ParsedArgs, name: string): string | undefined {
  return args.values.get(name)?.[0];
}

/** A comma-separated list option (`--features a,b`), names trimmed of surrounding spaces. */
export function listOf(args: ParsedArgs, name: string): string[] | undefined {
  const raw = args.values.get(name);
  if (!raw) return undefined;
  return raw.flatMap((v) => v.split(',')).map((s) => s.trim()).filter((s) => s.length > 0);
}

export function parseArgs(argv: readonly string[], specs: readonly OptionSpec[], command: string): ParsedArgs {
  const byName = new Map(specs.map((s) => [s.name, s]));
  const parsed: ParsedArgs = { positionals: [], values: new Map(), flags: new Set() };
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i]!;
    if (arg === '--') {
      parsed.positionals.push(...argv.slice(i + 1));
      break;
    }
    if (!arg.startsWith('--') || arg === '-') {
      if (arg.startsWith('-') && arg !== '-') throw new UsageError(`unknown option '${arg}' (options are spelled out with two dashes)`, command);
      parsed.positionals.push(arg);
      continue;
    }
    const equals = arg.indexOf('=');
    const name = arg.slice(2, equals < 0 ? undefined : equals);
    const spec = byName.get(name);
    if (!spec) {
      const known = specs.map((s) => `--${s.name}`).join(', ');
      throw new UsageError(`unknown option '--${name}' for '${command}' (known: ${known})`, command);
    }
    if (spec.value === undefined) {
      if (equals >= 0) throw new UsageError(`option '--${name}' takes no value`, command);
      parsed.flags.add(name);
      continue;
    }
    let value: string;
    if (equals >= 0) value = arg.slice(equals + 1);
    else {
      if (i + 1 >= argv.length) throw new UsageError(`option '--${name}' needs a value (${spec.value})`, command);
      value = argv[++i]!;
    }
    if (spec.values && !spec.values.includes(value)) {
      throw new UsageError(`'--${name}' must be one of ${spec.values.join(', ')} (got '${value}')`, command);
    }
    const problem = spec.check?.(value) ?? null;
    if (problem !== null) throw new UsageError(`'--${name} ${value}': ${problem}`, command);
    const previous = parsed.values.get(name);
    if (previous && !spec.repeatable) throw new UsageError(`option '--${name}' given twice`, command);
    parsed.values.set(name, [...(previous ?? []), value]);
  }
  return parsed;
}

/** The options section of a help screen, aligned. */
export function describeOptions(specs: readonly OptionSpec[]): string {
  const heads = specs.map((s) => `  --${s.name}${s.value ? ` ${s.values ? s.values.join('|') : s.value}` : ''}`);
  const width = Math.min(40, Math.max(...heads.map((h) => h.length)));
  return specs
    .map((s, i) => {
      const head = heads[i]!;
      return head.length > width ? `${head}\n${' '.repeat(width + 2)}${s.describe}` : `${head.padEnd(width)}  ${s.describe}`;
    })
    .join('\n');
}
