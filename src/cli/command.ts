// Shape of one CLI command and the small argument parser they share.

export interface CliIo {
  /** A line (or lines) for people; a newline is added when missing. */
  out(text: string): void;
  /** A message for people on stderr. */
  err(text: string): void;
  /** Data written byte for byte to stdout (CSV); `out` when missing. */
  data?(text: string): void;
}

/** What a command is given: `out` and `err` already terminal-safe (terminal.ts), `data` byte for byte. */
export type CommandIo = Required<CliIo>;

export interface CliCommand {
  name: string;
  help: string;
  run(args: string[], io: CommandIo): Promise<number>;
}

export interface ParsedArgs {
  positional: string[];
  options: Map<string, string | true>;
}

/**
 * Parses `--name value`, `--name=value` and bare flags. `flags` lists options that take no value.
 * Unknown options are an error so a typo never silently changes a result.
 */
export function parseArgs(args: string[], known: { flags?: string[]; values?: string[] }): ParsedArgs {
  const flags = new Set(known.flags ?? []);
  const values = new Set(known.values ?? []);
  const positional: string[] = [];
  const options = new Map<string, string | true>();
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    if (!a.startsWith('--') || a === '--') {
      positional.push(a);
      continue;
    }
    const eq = a.indexOf('=');
    const name = eq > 0 ? a.slice(2, eq) : a.slice(2);
    if (flags.has(name)) {
      if (eq > 0) throw new Error(`option --${name} takes no value`);
      options.set(name, true);
    } else if (values.has(name)) {
      const v = eq > 0 ? a.slice(eq + 1) : args[++i];
      if (v === undefined) throw new Error(`option --${name} needs a value`);
      options.set(name, v);
    } else {
      throw new Error(`unknown option --${name}`);
    }
  }
  return { positional, options };
}
