// `npm run bench [-- --quick] [--only NAME]`: measures what users wait for and prints a readable table, then ONE JSON object on the
// last line of stdout (figures, Node and browser side by side, machine, versions, targets met). It never fails the
// build: timings are information, and a section that fails is reported in the output instead. `--only NAME` runs the
// sections whose name starts with NAME (e.g. `--only team`).
import { BENCH_SECTIONS } from './sections.ts';
import { PAIRS, TARGETS, machine, targetsMet, versions, withHeadlines } from './harness.ts';
import { oneLine } from './stats.ts';
import type { Figure, Figures } from './harness.ts';

interface Side {
  value: Figure | undefined;
  met: boolean | null;
}

function side(figures: Figures, key: string | undefined, max: number | undefined): Side {
  const value = key === undefined ? undefined : figures[key];
  const met = max !== undefined && typeof value === 'number' && Number.isFinite(value) ? value <= max : null;
  return { value, met };
}

function shown(s: Side): string {
  return s.value === undefined || s.value === null ? '–' : String(s.value);
}

function metWord(s: Side): string {
  return s.met === true ? 'met' : s.met === false ? 'NOT met' : '–';
}

async function main(): Promise<void> {
  const quick = process.argv.includes('--quick');
  const onlyAt = process.argv.indexOf('--only');
  const only = onlyAt >= 0 ? process.argv[onlyAt + 1] : undefined;
  const sections = only === undefined ? BENCH_SECTIONS : BENCH_SECTIONS.filter((s) => s.name.startsWith(only));
  if (sections.length === 0) throw new Error(`--only ${only ?? ''}: no section's name starts with that (${BENCH_SECTIONS.map((s) => s.name).join(', ')})`);
  const log = (text: string): void => void process.stderr.write(`bench: ${text}\n`);
  const raw: Figures = {};
  const errors: Record<string, string> = {};
  const started = Date.now();
  const machineAtStart = machine();
  for (const section of sections) {
    try {
      Object.assign(raw, await section.run({ quick, log }));
    } catch (e) {
      errors[section.name] = oneLine(e);
      log(`${section.name} failed: ${errors[section.name]}`);
    }
  }
  const figures = withHeadlines(raw);
  const met = targetsMet(figures);
  const date = new Date();
  const m = machine();

  const rows = PAIRS.map((p) => {
    const max = TARGETS.find((t) => t.figure === p.name)?.max;
    return { name: p.name, max, node: side(figures, p.node, max), browser: side(figures, p.browser, max) };
  }).filter((r) => only === undefined || r.node.value !== undefined || r.browser.value !== undefined);
  const head = ['figure', 'Node', 'Chromium', 'target', 'Node', 'Chromium'];
  const body = rows.map((r) => [r.name, shown(r.node), shown(r.browser), r.max === undefined ? '' : `≤ ${r.max}`, metWord(r.node), metWord(r.browser)]);
  const widths = head.map((h, i) => Math.max(h.length, ...body.map((b) => b[i]!.length)));
  const line = (cells: string[]): string => cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]!) : c.padStart(widths[i]!))).join('  ').trimEnd();

  const lines: string[] = [
    `Rungbook benchmark${quick ? ' (quick)' : ''}${only === undefined ? '' : ` (only ${only})`}, ${date.toISOString().slice(0, 10)}: ${m['cpus']} × ${m['cpu_model']}, load average ${machineAtStart['load_avg_1m']} at start, ${m['load_avg_1m']} at end`,
    '',
    ...(rows.length > 0 ? [line(head), ...body.map(line), ''] : []),
  ];
  const paired = new Set(PAIRS.flatMap((p) => [p.name, p.node, p.browser]));
  const rest = Object.entries(figures).filter(([k]) => !paired.has(k));
  const width = Math.max(0, ...rest.map(([k]) => k.length));
  for (const [k, v] of rest) lines.push(`${k.padEnd(width)}  ${String(v)}`);
  for (const [name, e] of Object.entries(errors)) lines.push(`section ${name} failed: ${e}`);
  process.stdout.write(lines.join('\n') + '\n\n');

  const result = {
    quick,
    only: only ?? null,
    date: date.toISOString(),
    seconds: Math.round((Date.now() - started) / 100) / 10,
    figures,
    side_by_side: Object.fromEntries(
      rows.map((r) => [r.name, { node: r.node.value ?? null, browser: r.browser.value ?? null, max: r.max ?? null, node_met: r.node.met, browser_met: r.browser.met }]),
    ),
    targets: Object.fromEntries(TARGETS.map((t) => [t.figure, { max: t.max, met: met[t.figure], source: t.source }])),
    machine: { ...m, load_avg_1m_start: machineAtStart['load_avg_1m'] ?? null },
    versions: { ...versions(), chromium: figures['chromium'] ?? null },
    errors,
  };
  process.stdout.write(JSON.stringify(result) + '\n');
}

await main();
