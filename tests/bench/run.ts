// `npm run bench [-- --quick]`: measures what users wait for and prints a readable table, then ONE JSON object on the
// last line of stdout (figures, machine, versions, targets met). It never fails the build: timings are information.
import { BENCH_SECTIONS } from './sections.ts';
import { TARGETS, machine, targetsMet, versions } from './harness.ts';
import type { Figures } from './harness.ts';

async function main(): Promise<void> {
  const quick = process.argv.includes('--quick');
  const log = (text: string): void => void process.stderr.write(`bench: ${text}\n`);
  const figures: Figures = {};
  const errors: Record<string, string> = {};
  const started = Date.now();
  for (const section of BENCH_SECTIONS) {
    try {
      Object.assign(figures, await section.run({ quick, log }));
    } catch (e) {
      errors[section.name] = e instanceof Error ? e.message : String(e);
      log(`${section.name} failed: ${errors[section.name]}`);
    }
  }
  const met = targetsMet(figures);
  const lines: string[] = [`Rungbook benchmark${quick ? ' (quick)' : ''}, ${new Date().toISOString().slice(0, 10)}`, ''];
  const width = Math.max(...Object.keys(figures).map((k) => k.length));
  for (const [k, v] of Object.entries(figures)) {
    const t = TARGETS.find((x) => x.figure === k);
    const mark = t ? `  target ≤ ${t.max}: ${met[k] === true ? 'met' : met[k] === false ? 'NOT met' : 'not measured'}` : '';
    lines.push(`${k.padEnd(width)}  ${String(v)}${mark}`);
  }
  for (const t of TARGETS) if (!(t.figure in figures)) lines.push(`${t.figure.padEnd(width)}  (not measured by these sections)`);
  for (const [name, e] of Object.entries(errors)) lines.push(`section ${name} failed: ${e}`);
  process.stdout.write(lines.join('\n') + '\n\n');
  const result = {
    quick,
    date: new Date().toISOString(),
    seconds: Math.round((Date.now() - started) / 100) / 10,
    figures,
    targets: Object.fromEntries(TARGETS.map((t) => [t.figure, { max: t.max, met: met[t.figure], source: t.source }])),
    machine: machine(),
    versions: versions(),
    errors,
  };
  process.stdout.write(JSON.stringify(result) + '\n');
}

await main();
