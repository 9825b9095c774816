// `rungbook eval 'FORMULA'`: evaluates one formula in a fresh engine with Rungbook's functions and prints the value.
import { DetailedCellError } from 'hyperformula';
import type { CellValue } from 'hyperformula';
import { MAINS_CAUTION_LINE } from '../../domain/mains-caution.ts';
import { createEngine } from '../../engine/create.ts';
import { FORMULA_REFUSALS, engineFailure, guardFormula } from '../../engine/formula-guard.ts';
import type { CliCommand, CliIo } from '../command.ts';
import { shown } from '../terminal.ts';

const HELP = `usage: rungbook eval 'FORMULA'

Evaluates one formula with Rungbook's functions and prints its value: numbers at full double precision in SI
base units (the app rounds to about 12 significant figures for display), text as is, TRUE/FALSE for logical values, an array as tab-separated rows. The leading "=" is optional.
An error value is printed to stderr as "#NUM!: message" and the exit status is 1.

examples:
  rungbook eval 'MAINS_PEAK(230, 0.1)'
  rungbook eval '=XCAP_AMPS(0.47e-6, 230, 50)'
  rungbook eval 'E_NEAR(5000, 96)'

${MAINS_CAUTION_LINE}`;

/** A scalar as the CLI prints it; numbers through String(), which is the shortest text that reads back exactly. */
function scalarText(v: CellValue): string {
  if (typeof v === 'number') return Object.is(v, -0) ? '0' : String(v);
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  if (v === null) return '';
  if (v instanceof DetailedCellError) return v.value;
  return v;
}

function errorText(e: DetailedCellError): string {
  return e.message ? `${e.value}: ${e.message}` : e.value;
}

export const command: CliCommand = {
  name: 'eval',
  help: HELP,
  async run(args: string[], io: CliIo): Promise<number> {
    // Everything after the command is the formula, so a formula may start with "-" and need not be quoted whole.
    const text = args.filter((a, i) => !(a === '--' && i === 0)).join(' ').trim();
    if (text === '') {
      io.err(`rungbook eval: give a formula\n\n${HELP}`);
      return 2;
    }
    const formula = text.startsWith('=') ? text : `=${text}`;
    // The engine normally rounds results it hands out to about 12 significant figures for display; eval shows the
    // exact double instead, so a script gets every digit the formula produced.
    // Formulas too long, too deep or over too large a range are refused before they reach the engine.
    // Plain syntax slips (an unclosed bracket or quote) get the engine's reading message below.
    const guard = guardFormula(formula);
    const syntaxOnly: string[] = [FORMULA_REFUSALS.unbalanced, FORMULA_REFUSALS.unclosedText];
    if (!guard.ok && !syntaxOnly.includes(guard.refusal.code)) {
      io.err(`rungbook eval: ${guard.refusal.message}`);
      return 1;
    }
    // What the engine reads: the guard's text, in the one formula syntax (680E-9, bare TRUE); a formula with a
    // syntax slip goes as typed so the engine's reading message below says what is wrong.
    const engineText = guard.ok ? guard.formula : formula;
    const hf = createEngine({ smartRounding: false });
    try {
      if (!hf.validateFormula(engineText)) {
        io.err(`rungbook eval: cannot read ${JSON.stringify(formula)} as a formula (check brackets, commas and quotes; write 4.7e3, not 4.7k)`);
        return 1;
      }
      const sheet = hf.getSheetId(hf.addSheet('eval'))!;
      let value: ReturnType<typeof hf.calculateFormula>;
      try {
        value = hf.calculateFormula(engineText, sheet);
      } catch (e) {
        io.err(`rungbook eval: the formula could not be evaluated: ${engineFailure(e)}`);
        return 1;
      }
      const rows = Array.isArray(value) ? value : [[value]];
      const firstError = rows.flat().find((v): v is DetailedCellError => v instanceof DetailedCellError);
      if (firstError && !Array.isArray(value)) {
        io.err(errorText(firstError));
        return 1;
      }
      // Tabs and line breaks lay out an array; inside a value they, and any control character, are shown as escapes.
      io.out(rows.map((row) => row.map((v) => shown(scalarText(v))).join('\t')).join('\n'));
      if (firstError) {
        io.err(errorText(firstError));
        return 1;
      }
      return 0;
    } finally {
      hf.destroy();
    }
  },
};
