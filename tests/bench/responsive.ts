// What a person feels in the built app, in Chromium, with the reference family (200 variants × 80 build lines) opened
// through the Book menu: for each step — the open, a parameter edit in the Family grid, its undo, a quote price edit
// on the Quotes page, a quantity edit and a rule edit (a line's applies-when formula) on the Build page, page switches — the time from the person's action to its
// visible effect (from the time stamp of the input event that made the edit, a click or a key press, to the first
// animation frame whose DOM shows it), and the longest main-thread task meanwhile (Long Tasks API: tasks of 50 ms or more; none = 0)
// with the longest gap between painted frames. An edit's effect is shown twice: the edited value itself, and the
// unit cost on the Family page worked out again from it (for edits made on another page, that includes going back
// to the Family page through the rail).
import type { BrowserContext, Locator, Page } from 'playwright-core';
import type { Book } from '../../src/domain/book.ts';
import { costVariant } from '../../src/io/run-export.ts';
import { referenceFamily } from '../fixtures/reference-family.ts';
import { writeBookFile } from './book-file.ts';
import type { Figures } from './harness.ts';
import { round } from './stats.ts';

/** A page-side query through shadow roots (`deep(root, selector)`), as source text for the probes below and others. */
export const DEEP_QUERY = `const deep = (root, sel) => {
    const hit = root.querySelector(sel);
    if (hit) return hit;
    for (const el of root.querySelectorAll('*')) {
      const inner = el.shadowRoot ? deep(el.shadowRoot, sel) : null;
      if (inner) return inner;
    }
    return null;
  };`;

/**
 * Runs in every document before the app's scripts: records long tasks (start, duration) and, each animation frame,
 * the longest gap between frames since `__rbMark()` was last called. A string, so no build helper leaks in.
 */
export const LONG_TASK_PROBE = `(() => {
  const long = [];
  window.__rbLong = long;
  try {
    new PerformanceObserver((list) => { for (const e of list.getEntries()) long.push([e.startTime, e.duration]); })
      .observe({ type: 'longtask', buffered: true });
  } catch {}
  const gap = { max: 0, last: performance.now() };
  window.__rbGapSince = gap;
  window.__rbMark = () => { gap.max = 0; gap.last = performance.now(); return gap.last; };
  const tick = () => { const now = performance.now(); gap.max = Math.max(gap.max, now - gap.last); gap.last = now; requestAnimationFrame(tick); };
  requestAnimationFrame(tick);
  ${DEEP_QUERY}
  // The probes below run every frame, inside the tasks they measure: an element once found is kept while it is still
  // in the page and still matches, so the walk through every shadow root (several ms on a large page) runs once.
  const found = new Map();
  const deepKept = (sel) => {
    const kept = found.get(sel);
    if (kept && kept.isConnected && kept.matches(sel)) return kept;
    const hit = deep(document, sel);
    if (hit) found.set(sel, hit);
    return hit;
  };
  window.__rbDeep = deepKept;
  window.__rbCost = (code, run, w) => {
    const table = deepKept('[data-testid="family-table"]');
    const col = table ? [...table.querySelectorAll('thead th')].findIndex((th) => th.getAttribute('data-key') === 'cost_' + run) : -1;
    const row = table && [...table.querySelectorAll('tbody tr')].find((tr) => tr.querySelector('th')?.textContent?.trim() === code);
    const text = (col >= 0 && row?.children[col]?.textContent?.trim()) || '';
    const fits = /\\d/.test(text) && (w.is === undefined || text === w.is) && (w.not === undefined || text !== w.not);
    return fits ? { at: performance.now(), text } : false;
  };
  window.__rbUntil = (test, timeout) => new Promise((resolve, reject) => {
    const end = performance.now() + timeout;
    const tick = () => {
      const r = test();
      if (r) resolve(r);
      else if (performance.now() > end) reject(new Error('not seen in ' + timeout + ' ms'));
      else requestAnimationFrame(tick);
    };
    tick();
  });
  window.__rbText = (sel, want) => (deepKept(sel)?.textContent?.trim() === want ? performance.now() : false);
  // The time stamp of the person's last click or key press, as the page received it.
  window.__rbInput = 0;
  for (const type of ['click', 'keydown']) addEventListener(type, (e) => { window.__rbInput = e.timeStamp; }, { capture: true });
  // Watches every frame, from before an action, for its effect: window.__rbSeen is the page time it was first seen.
  window.__rbWatch = (test) => { window.__rbSeen = undefined; window.__rbUntil(test, 120000).then((t) => { window.__rbSeen = t; }, () => {}); };
  window.__rbShows = (sel, text) => {
    const el = deepKept(sel);
    return el && [...el.querySelectorAll('code')].some((c) => c.textContent.trim() === text) ? performance.now() : false;
  };
})();`;

/** Starts watching, every frame, for an effect (page-side expression giving a page time, or false) before the action. */
async function watch(page: Page, test: string): Promise<void> {
  await page.evaluate(`window.__rbWatch(() => ${test})`);
}

/** Time from the last input event the page received to the first frame showing the watched effect. */
async function seen(page: Page): Promise<{ input: number; at: number }> {
  return page.evaluate(`window.__rbUntil(() => window.__rbSeen !== undefined && { input: window.__rbInput, at: window.__rbSeen }, 120000)`) as Promise<{
    input: number;
    at: number;
  }>;
}

/** Page time now, and the frame-gap probe started afresh. */
function mark(page: Page): Promise<number> {
  return page.evaluate('window.__rbMark()') as Promise<number>;
}

/** The longest task that overlapped [from, to] in page time (0 when none reached 50 ms), and the longest frame gap. */
async function strain(page: Page, from: number, to: number): Promise<{ task: number; gap: number }> {
  return page.evaluate(`(() => {
    let task = 0;
    for (const [start, d] of window.__rbLong) if (start < ${to} && start + d > ${from}) task = Math.max(task, d);
    return { task, gap: Math.max(window.__rbGapSince.max, performance.now() - window.__rbGapSince.last) };
  })()`) as Promise<{ task: number; gap: number }>;
}

/**
 * Waits, checking every frame, until the Family grid's row of `code` shows a unit cost at `run` that is `want.is`,
 * or is not `want.not`, or any figure; gives the page time it was first seen.
 */
async function gridCost(page: Page, code: string, run: number, want: { is?: string; not?: string } = {}, timeout = 120_000): Promise<{ at: number; text: string }> {
  return page.evaluate(`window.__rbUntil(() => window.__rbCost(${JSON.stringify(code)}, ${run}, ${JSON.stringify(want)}), ${timeout})`) as Promise<{
    at: number;
    text: string;
  }>;
}

/** A point in the window, in CSS pixels. */
interface Spot {
  x: number;
  y: number;
}

/**
 * Where a person would click `target` (its centre), found before a step's clock starts. The driver's own locators
 * query the page through every shadow root and check the target before clicking, on the page's thread: inside a step
 * they took up to 25 ms of its tasks, work no person's click causes.
 */
async function spot(target: Locator): Promise<Spot> {
  await target.scrollIntoViewIfNeeded();
  const box = await target.boundingBox();
  if (!box) throw new Error('nothing to click: the element is not laid out');
  return { x: box.x + box.width / 2, y: box.y + box.height / 2 };
}

/** A click at a spot found beforehand: the input events alone, as a person's click. */
async function clickAt(page: Page, at: Spot): Promise<void> {
  await page.mouse.click(at.x, at.y);
}

/** Waits, checking every frame with the page's probe, until `sel` is in the page; gives the page time it was first seen. */
function appears(page: Page, sel: string, timeout = 60_000): Promise<number> {
  return page.evaluate(`window.__rbUntil(() => window.__rbDeep(${JSON.stringify(sel)}) && performance.now(), ${timeout})`) as Promise<number>;
}

/** The rail's links stay put while a Book is open (the rail is sticky, as high as the window): found once, clicked at their spots. */
const RAIL = ['family', 'quotes', 'build', 'compare'] as const;
type RailSpots = Record<(typeof RAIL)[number], Spot>;

async function railSpots(page: Page): Promise<RailSpots> {
  const spots = {} as RailSpots;
  for (const slug of RAIL) spots[slug] = await spot(page.locator(`nav a[href="#/${slug}"]`));
  return spots;
}

/** The quote and break a variant's dearest costed line buys at, from the same costing as the app. */
function dearestQuote(book: Book, variantId: string, run: number): { quoteId: string; breakIndex: number; supplierCode: string; price: number } {
  const r = costVariant(book, variantId, run);
  if (!r.ok) throw new Error(r.error);
  const line = [...r.value.bom.lines].sort((a, b) => b.extendedBase - a.extendedBase)[0]!;
  const quote = book.quotes.find((q) => q.id === line.quoteId)!;
  const breakIndex = quote.breaks.findIndex((b) => b.qty === line.breakQty);
  return { quoteId: quote.id, breakIndex, supplierCode: quote.supplierCode, price: quote.breaks[breakIndex]!.price };
}

export async function responsiveFigures(context: BrowserContext, appUrl: string, log: (t: string) => void): Promise<Figures> {
  const book = referenceFamily().book;
  const file = writeBookFile('reference-family.rungbook.json', book);
  const first = book.variants.map((v) => v.code).sort()[0]!;
  const variant = book.variants.find((v) => v.code === first)!;
  const run = book.settings.runSizes[0]!;
  const f: Figures = {};
  /** `shown.visible` is a page time, or the input and the frame that showed its effect (timed from the input). */
  const record = async (name: string, page: Page, t0: number, shown: { visible?: number | { input: number; at: number }; cost?: number }): Promise<void> => {
    const visible = typeof shown.visible === 'object' ? shown.visible.at : shown.visible;
    const end = Math.max(visible ?? 0, shown.cost ?? 0);
    const s = await strain(page, t0, end);
    if (typeof shown.visible === 'object') f[`ui_${name}_visible_ms`] = round(shown.visible.at - shown.visible.input);
    else if (shown.visible !== undefined) f[`ui_${name}_visible_ms`] = round(shown.visible - t0);
    if (shown.cost !== undefined) f[`ui_${name}_cost_ms`] = round(shown.cost - t0);
    f[`ui_${name}_longest_task_ms`] = round(s.task);
    f[`ui_${name}_max_frame_gap_ms`] = round(s.gap);
  };

  const page = await context.newPage();
  /** The step under way, named in a failure (a wait that timed out says only how long it waited). */
  let at = 'the first view';
  try {
    await page.addInitScript({ content: LONG_TASK_PROBE });
    await page.goto(`${appUrl}#/family`);
    await page.locator('[data-testid="family-table"] tbody tr').first().waitFor({ timeout: 60_000 });
    // The offline copy installs once, after the first view (the browser compiles every script it stores): let it
    // finish, as it would before anyone opens a file, so the steps below measure the app and not that one-time work.
    await page
      .evaluate(() => Promise.race([navigator.serviceWorker?.ready.then(() => true), new Promise((r) => setTimeout(() => r(false), 15_000))]))
      .catch(() => undefined);

    at = 'the open of the reference family';
    log(`browser: responsiveness with the reference family (${book.variants.length} variants × ${book.buildLines.length} lines)`);
    await page.locator('rb-book-menu input[type="file"]').setInputFiles(file.path);
    const dialog = page.locator('rb-book-menu dialog[open]');
    await dialog.waitFor({ timeout: 120_000 });
    const replace = await spot(dialog.getByRole('button', { name: 'Replace with the file' }));
    let t0 = await mark(page);
    await clickAt(page, replace);
    const opened = await gridCost(page, first, run);
    await record('open', page, t0, { cost: opened.at });
    // Found once the Book is open: the Book's name above the links may take another line.
    const railAt = await railSpots(page);
    const rail = (slug: keyof RailSpots): Promise<void> => clickAt(page, railAt[slug]);

    at = 'the parameter edit';
    // A parameter edit in the Family grid: one more step on the first variant.
    const keys = await page.locator('[data-testid="family-table"] thead th').evaluateAll((ths) => ths.map((th) => th.getAttribute('data-key')));
    const codes = await page.locator('[data-testid="family-table"] tbody th').allTextContents();
    const r = codes.map((c) => c.trim()).indexOf(first);
    const cell = page.locator(`[data-testid="family-table"] [data-r="${r}"][data-c="${keys.indexOf('steps')}"]`);
    const steps = Number(variant.params['steps']);
    const next = steps >= 8 ? steps - 1 : steps + 1;
    await cell.click();
    await page.keyboard.press('Enter');
    await page.keyboard.press('Control+A');
    await page.keyboard.type(String(next));
    const cellSel = `[data-testid="family-table"] [data-r="${r}"][data-c="${keys.indexOf('steps')}"]`;
    await watch(page, `window.__rbText(${JSON.stringify(cellSel)}, ${JSON.stringify(String(next))})`);
    t0 = await mark(page);
    await page.keyboard.press('Enter');
    const shownValue = await seen(page);
    const paramCost = await gridCost(page, first, run, { not: opened.text });
    await record('param_edit', page, t0, { visible: shownValue, cost: paramCost.at });

    at = 'the undo';
    // Its undo, from the Family page's own button.
    const undo = await spot(page.getByRole('button', { name: '↶ Undo' }));
    t0 = await mark(page);
    await clickAt(page, undo);
    const undone = await gridCost(page, first, run, { is: opened.text });
    await record('undo', page, t0, { cost: undone.at });

    at = 'the price edit';
    // A quote price edit on the Quotes page, then back to the Family page for the new unit cost.
    const q = dearestQuote(book, variant.id, run);
    t0 = await mark(page);
    await rail('quotes');
    const quotesShown = await appears(page, '[data-testid="quotes-table"]');
    await record('switch_to_quotes', page, t0, { visible: quotesShown });
    await page.getByLabel('Filter quotes').fill(q.supplierCode);
    await page.locator(`[data-testid="quotes-table"] tbody tr[data-id="${q.quoteId}"]`).getByRole('button', { name: 'edit' }).click();
    await page.locator(`#f-break-price-${q.breakIndex}`).fill(String(round(q.price * 3 + 1, 4)));
    await watch(page, `!window.__rbDeep('rb-quote-form') && performance.now()`);
    const saveQuote = await spot(page.getByRole('button', { name: 'Save the quote' }));
    t0 = await mark(page);
    await clickAt(page, saveQuote);
    const priceShown = await seen(page);
    await rail('family');
    const priceCost = await gridCost(page, first, run, { not: opened.text });
    await record('price_edit', page, t0, { visible: priceShown, cost: priceCost.at });

    at = 'the quantity edit';
    // A quantity edit on the Build page: the first line the variant buys gets one more part per unit.
    const line = book.buildLines.find((l) => /^\d+$/.test(l.qtyRule) && l.appliesWhen === '' && l.partId !== undefined)!;
    t0 = await mark(page);
    await rail('build');
    const buildShown = await appears(page, '[data-testid="build-lines"]');
    await record('switch_to_build', page, t0, { visible: buildShown });
    await page.locator(`[data-testid="build-lines"] tbody tr[data-id="${line.id}"]`).getByRole('button', { name: 'edit' }).click();
    await page.locator('#f-qtyRule input').fill(String(Number(line.qtyRule) + 1));
    await watch(page, `window.__rbShows(${JSON.stringify(`[data-testid="build-lines"] tbody tr[data-id="${line.id}"]`)}, ${JSON.stringify(String(Number(line.qtyRule) + 1))})`);
    let saveLine = await spot(page.getByRole('button', { name: 'Save the line' }));
    t0 = await mark(page);
    await clickAt(page, saveLine);
    const qtyShown = await seen(page);
    await rail('family');
    const qtyCost = await gridCost(page, first, run, { not: priceCost.text });
    await record('quantity_edit', page, t0, { visible: qtyShown, cost: qtyCost.at });

    at = 'the rule edit';
    // A rule edit on the Build page: another line the variant buys applies to every variant but this one (a formula
    // over a parameter), shown in the Build table, then its unit cost on the Family page.
    const ruled = book.buildLines.find((l) => l.id !== line.id && /^\d+$/.test(l.qtyRule) && l.appliesWhen === '' && l.partId !== undefined)!;
    const when = `steps <> ${steps}`;
    await rail('build');
    await page.locator(`[data-testid="build-lines"] tbody tr[data-id="${ruled.id}"]`).getByRole('button', { name: 'edit' }).click();
    await page.locator('#f-appliesWhen input').fill(when);
    await watch(page, `window.__rbShows(${JSON.stringify(`[data-testid="build-lines"] tbody tr[data-id="${ruled.id}"]`)}, ${JSON.stringify(when)})`);
    saveLine = await spot(page.getByRole('button', { name: 'Save the line' }));
    t0 = await mark(page);
    await clickAt(page, saveLine);
    const ruleShown = await seen(page);
    await rail('family');
    const ruleCost = await gridCost(page, first, run, { not: qtyCost.text });
    await record('rule_edit', page, t0, { visible: ruleShown, cost: ruleCost.at });

    at = 'the switches to Compare and back';
    // Page switches with the large family: to Compare and back.
    t0 = await mark(page);
    await rail('compare');
    await record('switch_to_compare', page, t0, { visible: await appears(page, '[data-testid="compare-table"]') });
    t0 = await mark(page);
    await rail('family');
    const back = await gridCost(page, first, run);
    await record('switch_to_family', page, t0, { visible: back.at });

    const longest = Object.entries(f)
      .filter(([k]) => k.endsWith('_longest_task_ms'))
      .reduce((m, [, v]) => Math.max(m, v as number), 0);
    f['ui_longest_task_ms'] = longest;
    f['ui_book'] = `reference family (${book.variants.length} variants × ${book.buildLines.length} lines, ${book.quotes.length} quotes), opened through the Book menu`;
    return f;
  } catch (e) {
    throw new Error(`${at}: ${e instanceof Error ? e.message : String(e)}`, { cause: e });
  } finally {
    await page.close();
  }
}
