// The `rungbook` command line: dispatches to one module per command. Runs in Node with no DOM and no IndexedDB.
import type { CliCommand, CliIo } from './command.ts';
import { nodeIo, terminalIo } from './terminal.ts';

/** Commands by name, loaded on demand so `rungbook eval` does not pay for the importer. */
const COMMANDS: Record<string, () => Promise<{ command: CliCommand }>> = {
  eval: () => import('./commands/eval.ts'),
  check: () => import('./commands/check.ts'),
  info: () => import('./commands/info.ts'),
  demo: () => import('./commands/demo.ts'),
  import: () => import('./commands/import.ts'),
  cost: () => import('./commands/cost.ts'),
  buy: () => import('./commands/buy.ts'),
  plan: () => import('./commands/plan.ts'),
  receive: () => import('./commands/receive.ts'),
  count: () => import('./commands/count.ts'),
  prices: () => import('./commands/prices.ts'),
  'order-doc': () => import('./commands/order-doc.ts'),
};

function usage(): string {
  const lines = ['usage: rungbook <command> [options]', '', 'commands:'];
  for (const name of Object.keys(COMMANDS).sort()) lines.push(`  ${name}`);
  lines.push('', "Run 'rungbook <command> --help' for a command's options.");
  return lines.join('\n');
}

/** Runs the CLI and returns the exit status. */
export async function main(argv: string[], given: CliIo = nodeIo()): Promise<number> {
  const io = terminalIo(given);
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    io.out(usage());
    return name ? 0 : 2;
  }
  const load = COMMANDS[name];
  if (!load) {
    io.err(`rungbook: unknown command '${name}'\n${usage()}`);
    return 2;
  }
  const { command } = await load();
  if (rest.includes('--help') || rest.includes('-h')) {
    io.out(command.help);
    return 0;
  }
  try {
    return await command.run(rest, io);
  } catch (e) {
    io.err(`rungbook ${name}: ${e instanceof Error ? e.message : String(e)}`);
    return 1;
  }
}
