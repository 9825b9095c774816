// `rungbook check FILE`: evaluates every engineering check of every variant of a Book file (the Book's own checks
// plus the built-in ones it does not have yet) and prints them as a table or as JSON.
import type { Book } from '../../domain/book.ts';
import { STATUS_SYMBOL, worstOf } from '../../domain/check-status.ts';
import type { CheckValue } from '../../domain/check-status.ts';
import { MAINS_CAUTION_LINE as MAINS_CAUTION } from '../../domain/mains-caution.ts';
import { formatValue } from '../../domain/units.ts';
import { FamilyWorkbook } from '../../engine/family.ts';
import type { CheckResult } from '../../engine/family.ts';
import { addBuiltInChecks, formatRule } from '../../engine/check-sheets.ts';
import { loadBook } from '../book-read.ts';
import type { CliCommand, CliIo } from '../command.ts';
import { parseArgs } from '../command.ts';
import { loadBuiltInChecks } from '../check-sheets-fs.ts';
import { jsonText, shown } from '../terminal.ts';

const HELP = `usage: rungbook check FILE [--variant CODE] [--json] [--strict]

Evaluates every engineering check on every variant of a .rungbook.json Book: the Book's own checks, plus the
built-in checks of sheets/ that the Book does not have yet.

  --variant CODE  only the variant with this code
  --json          print an array of {variant, check, value, unit, status, rule, limit, message, approvedPart}
  --strict        exit with status 1 when any check fails or cannot be evaluated (status fail or error)

A check that reads the part of a line with approved alternates is judged with every approved part; the worst
result is printed and the note names the part that gives it (approvedPart in JSON: line, part, mpn, parts judged).

Status words: pass ${STATUS_SYMBOL.pass}, margin ${STATUS_SYMBOL.margin}, fail ${STATUS_SYMBOL.fail}, n/a ${STATUS_SYMBOL['n/a']}, error ${STATUS_SYMBOL.error}.
Exit status: 0 done, 1 a failure under --strict, 2 bad arguments or an unreadable Book file.
${MAINS_CAUTION}`;

/** One result as the --json output writes it. */
export interface CheckJson {
  variant: string;
  check: string;
  value: CheckValue;
  unit: string;
  status: string;
  rule: string;
  limit: string;
  message: string;
  /** The approved part giving the result, when the check reads a line with approved alternates. */
  approvedPart: { line: string; part: string; mpn: string; judged: number } | null;
}

function showValue(value: CheckValue, unit: string): string {
  if (value === null) return '';
  if (typeof value === 'boolean') return value ? 'TRUE' : 'FALSE';
  if (typeof value === 'string') return value;
  if (unit === '') return Number(value.toPrecision(4)).toString();
  return formatValue(value, unit, 4);
}

/** The evaluated limit with the check's unit: "≤ 480 V", "500 Hz … 5 kHz". */
function showLimit(r: CheckResult): string {
  const v = (n: number | undefined): string => (n === undefined ? '?' : showValue(n, r.unit));
  if (r.limits.limit !== undefined) return r.limit.startsWith('≥') ? `≥ ${v(r.limits.limit)}` : `≤ ${v(r.limits.limit)}`;
  if (r.limits.low !== undefined || r.limits.high !== undefined) return `${v(r.limits.low)} … ${v(r.limits.high)}`;
  return r.limit;
}

function table(rows: string[][]): string[] {
  const widths = rows[0]!.map((_, c) => Math.max(...rows.map((r) => [...r[c]!].length)));
  return rows.map((r) => r.map((cell, c) => (c === r.length - 1 ? cell : cell.padEnd(widths[c]!))).join('  ').trimEnd());
}

export const command: CliCommand = {
  name: 'check',
  help: HELP,
  async run(args: string[], io: CliIo): Promise<number> {
    let parsed;
    try {
      parsed = parseArgs(args, { flags: ['json', 'strict'], values: ['variant'] });
    } catch (e) {
      io.err(`rungbook check: ${e instanceof Error ? e.message : String(e)}\n${HELP}`);
      return 2;
    }
    if (parsed.positional.length !== 1) {
      io.err(`rungbook check: give exactly one Book file\n${HELP}`);
      return 2;
    }
    const read = await loadBook('check', parsed.positional[0]!, io);
    if (!read) return 2;
    const book = read.book;
    const code = parsed.options.get('variant');
    let variants = book.variants;
    if (typeof code === 'string') {
      variants = book.variants.filter((v) => v.code === code);
      if (variants.length === 0) {
        io.err(`rungbook check: no variant with code ${code}; the Book has ${book.variants.map((v) => shown(v.code)).join(', ') || 'no variants'}`);
        return 2;
      }
    }
    const full = addBuiltInChecks(book, loadBuiltInChecks());
    // Only the chosen variants are compiled; build lines and parts stay whole so rules resolve the same way.
    const subject: Book = { ...full, variants };
    const workbook = FamilyWorkbook.open(subject);
    const results = workbook.results();
    const problems = workbook.resolve().problems;
    workbook.close();
    const checksById = new Map(subject.checks.map((c) => [c.id, c]));
    const json = parsed.options.get('json') === true;

    for (const p of problems) io.err(`warning: ${shown(p.variantCode)} line ${shown(p.lineId)}: ${shown(p.message)}`);
    if (json) {
      const out: CheckJson[] = results.map((r) => ({
        variant: r.variantCode,
        check: r.checkName,
        value: r.value,
        unit: r.unit,
        status: r.status,
        rule: formatRule(checksById.get(r.checkId)!.rule),
        limit: r.limit,
        message: r.message,
        approvedPart: r.approvedPart ? { line: r.approvedPart.lineId, part: r.approvedPart.partId, mpn: r.approvedPart.mpn, judged: r.approvedPart.judged } : null,
      }));
      io.out(jsonText(out));
      io.err(MAINS_CAUTION);
    } else {
      io.out(MAINS_CAUTION);
      for (const v of variants) {
        const mine = results.filter((r) => r.variantId === v.id);
        io.out('');
        io.out(`${shown(v.code)} — ${shown(v.name)}: ${summary(mine)}`);
        const rows = [['check', 'value', 'status', 'limit', 'note']];
        for (const r of mine) {
          const title = checksById.get(r.checkId)!.title;
          const worst = r.approvedPart ? ` [worst of ${r.approvedPart.judged} approved parts: ${r.approvedPart.mpn}]` : '';
          const note = r.status === 'n/a' ? '' : r.status === 'error' ? r.message : `${title}${worst}`;
          // Names, text values and notes come from the Book: shown with control characters made visible.
          rows.push([shown(r.checkName), shown(showValue(r.value, r.unit)), `${STATUS_SYMBOL[r.status]} ${r.status}`, shown(showLimit(r)), shown(note)]);
        }
        for (const line of table(rows)) io.out(`  ${line}`);
      }
    }
    const failing = results.filter((r) => r.status === 'fail' || r.status === 'error').length;
    if (parsed.options.get('strict') === true && failing > 0) {
      io.err(`rungbook check: ${failing} check result${failing === 1 ? '' : 's'} failed or could not be evaluated`);
      return 1;
    }
    return 0;
  },
};

function summary(results: readonly CheckResult[]): string {
  const counts = new Map<string, number>();
  for (const r of results) counts.set(r.status, (counts.get(r.status) ?? 0) + 1);
  const parts = (['pass', 'margin', 'fail', 'error', 'n/a'] as const).filter((s) => counts.has(s)).map((s) => `${counts.get(s)} ${s}`);
  return `worst ${worstOf(results.map((r) => r.status))} (${parts.join(', ')})`;
}
