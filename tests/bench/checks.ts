// Checks figures of the benchmark, in Node: the family workbook opened with the 36 built-in checks on 200 variants
// (every result read, as the Checks page does), one parameter edit followed by reading the results again, and the
// open of a 2,000-variant family. The family repeats the demo Book's variants with varied load and ambient, so
// every check has real parameters to work on and the statuses are a mix of pass, margin, fail and n/a.
import { demoBook } from '../../src/domain/demo-book.ts';
import { seededRandom } from '../fixtures/seeded-random.ts';
import type { Book, Variant } from '../../src/domain/book.ts';
import { FamilyWorkbook } from '../../src/engine/family.ts';
import type { CheckResult } from '../../src/engine/family.ts';
import { loadBuiltInChecks } from '../../src/cli/check-sheets-fs.ts';
import type { BenchOptions, BenchSection, Figures } from './harness.ts';
import { median, round, timeMs } from './stats.ts';

export const CHECKS_FAMILY = { variants: 200, large: 2_000, seed: 20250603 } as const;

const LOADS = [40, 60, 75, 100, 150] as const;

/** The demo Book with `variants` variants cycled from its own, each with a seeded load and ambient temperature. */
export function checksFamily(variants: number, seed: number = CHECKS_FAMILY.seed): Book {
  const demo = demoBook();
  const rnd = seededRandom(seed);
  const out: Variant[] = [];
  for (let i = 0; i < variants; i++) {
    const src = demo.variants[i % demo.variants.length]!;
    const params: Variant['params'] = { ...src.params, load_w: LOADS[Math.floor(rnd() * LOADS.length)]! };
    if (typeof params['t_amb'] === 'number') params['t_amb'] = 35 + Math.floor(rnd() * 16);
    out.push({ ...src, id: `${src.id}_${i + 1}`, code: `${src.code}-${String(i + 1).padStart(4, '0')}`, params });
  }
  return { ...demo, variants: out, checks: loadBuiltInChecks() };
}

function statusCounts(results: readonly CheckResult[]): string {
  const n = new Map<string, number>();
  for (const r of results) n.set(r.status, (n.get(r.status) ?? 0) + 1);
  return [...n].map(([k, v]) => `${k} ${v}`).join(', ');
}

/** Opens a session and reads every result: what the Checks page waits for before it can draw. */
function openAndRead(book: Book): { session: FamilyWorkbook; results: CheckResult[]; ms: number } {
  let session: FamilyWorkbook | undefined;
  let results: CheckResult[] = [];
  const ms = timeMs(() => {
    session = FamilyWorkbook.open(book);
    results = session.results();
  });
  return { session: session!, results, ms };
}

export const checksSection: BenchSection = {
  name: 'checks (Node)',
  async run({ quick, log }: BenchOptions): Promise<Figures> {
    const f: Figures = {};
    const book = checksFamily(CHECKS_FAMILY.variants);
    f['checks_family'] = `${book.variants.length} variants × ${book.checks.length} checks`;

    log('checks: open');
    const opens: number[] = [];
    let last: ReturnType<typeof openAndRead> | undefined;
    for (let i = 0; i < (quick ? 3 : 6); i++) {
      last?.session.close();
      last = openAndRead(book);
      opens.push(last.ms);
    }
    const { session, results } = last!;
    if (results.length !== book.variants.length * book.checks.length) throw new Error(`expected a result per variant and check, got ${results.length}`);
    f['checks_open_cold_ms'] = round(opens[0]!);
    f['checks_open_ms'] = round(median(opens.slice(1)));
    f['checks_statuses'] = statusCounts(results);

    // An edit is what the Checks page does when a parameter changes: set it, then read every result again.
    log('checks: parameter edits');
    const edits: number[] = [];
    let changed = 0;
    for (let i = 0; i < 20; i++) {
      const v = book.variants[(i * 37) % book.variants.length]!;
      const load = LOADS[(LOADS.indexOf(v.params['load_w'] as (typeof LOADS)[number]) + 1 + i) % LOADS.length]!;
      let after: CheckResult[] = [];
      edits.push(
        timeMs(() => {
          const r = session.setParam(v.id, 'load_w', load);
          if (!r.ok) throw new Error(r.error);
          after = session.results();
        }),
      );
      if (after.length !== results.length) throw new Error('an edit changed the number of results');
      const before = new Map(results.filter((r) => r.variantId === v.id).map((r) => [r.checkId, r.value] as const));
      if (after.some((r) => r.variantId === v.id && r.value !== before.get(r.checkId))) changed++;
    }
    f['checks_edit_ms'] = round(median(edits), 2);
    f['checks_edit_max_ms'] = round(Math.max(...edits), 2);
    // A timing of edits that changed nothing would flatter the engine: count the edits that moved a value.
    f['checks_edits_that_changed_a_value'] = changed;
    session.close();

    log('checks: large family');
    const large = checksFamily(CHECKS_FAMILY.large);
    f['checks_large_family'] = `${large.variants.length} variants × ${large.checks.length} checks`;
    const larges: number[] = [];
    for (let i = 0; i < (quick ? 1 : 3); i++) {
      const big = openAndRead(large);
      larges.push(big.ms);
      big.session.close();
      if (big.results.length !== large.variants.length * large.checks.length) throw new Error('the large family did not give a result per variant and check');
    }
    f['checks_large_open_ms'] = round(median(larges));
    return f;
  },
};
