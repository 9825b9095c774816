// Long tables across a page switch, in real Chromium. A page taken off the screen keeps its rows but not their layout,
// so coming back lays every row it holds out in one frame. The Family grid draws only the rows in view (see
// row-window.ts): back from another page it draws just those for the first frame, is scrolled back where it was, and
// gets its spare rows above and below after that frame. A table drawn a slice per frame (see progressive.ts), such as
// the Build page's lines, draws its first slice again and the rest a slice per frame; on the first visit, the lines'
// standing across the variants is counted after the first frame. A long family's folded at-a-glance table is not
// made at all, so coming back draws the Family page once.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { serializeBook } from '../../src/io/book-file.ts';
import type { Book } from '../../src/domain/book.ts';
import { ROWS_AT_ONCE, ROWS_PER_FRAME } from '../../src/ui/progressive.ts';
import { referenceFamily } from '../fixtures/reference-family.ts';
import { AppUnderTest, pageLoaded, railTo } from './harness.ts';

const baseUrl = inject('baseUrl');
const book = referenceFamily({ variants: 120, lines: 80 }).book;

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

/** The Family grid's drawn rows (spacers left out) and its scrolling frame, read through the page's shadow roots. */
const GRID = `(() => {
  const grid = document.querySelector('rb-app').shadowRoot.querySelector('rb-family-page').shadowRoot.querySelector('rb-grid');
  const frame = grid.shadowRoot.querySelector('.frame');
  const rows = [...frame.querySelectorAll('tbody tr[aria-rowindex]')];
  return { frame, rows };
})()`;

interface GridState {
  rows: number;
  /** Code of the first variant row whose bottom edge is below the frame's header, i.e. the top row in view. */
  top: string;
  scrollTop: number;
  /** Rows the frame shows at once. */
  fits: number;
}

function gridState(page: Page): Promise<GridState> {
  return page.evaluate(`(() => {
    const { frame, rows } = ${GRID};
    const head = frame.querySelector('thead').getBoundingClientRect().bottom;
    const top = rows.find((tr) => tr.getBoundingClientRect().bottom > head + 1);
    const h = rows[0] ? rows[0].getBoundingClientRect().height : 1;
    return { rows: rows.length, top: top ? top.querySelector('th').textContent.trim() : '', scrollTop: frame.scrollTop, fits: Math.ceil(frame.clientHeight / h) };
  })()`);
}

async function openLongFamily(page: Page, family: Book = book): Promise<void> {
  await page.locator('rb-book-menu input[type="file"]').setInputFiles({
    name: 'long-family.rungbook.json',
    mimeType: 'application/json',
    buffer: Buffer.from(serializeBook(family)),
  });
  await page.locator('rb-book-menu dialog[open]').getByRole('button', { name: 'Replace with the file' }).click();
  await page.locator('[data-testid="notice"]', { hasText: 'Opened long-family.rungbook.json' }).waitFor();
}

/** Counts, in the first animation frame after the next page switch, what `count` (page-side source text) gives. */
async function countAtFirstFrame(page: Page, count: string): Promise<void> {
  await page.evaluate(`addEventListener('hashchange', () => requestAnimationFrame(() => { window.__firstFrame = ${count}; }), { once: true })`);
}

/**
 * Waits until the page-side expression `test` is true. Asked from here every 50 ms: the driver's own waiting
 * compiles a text expression inside the page, which the app's content security policy refuses.
 */
async function until(page: Page, test: string, timeout = 30_000): Promise<void> {
  const end = Date.now() + timeout;
  while (!(await page.evaluate(test))) {
    if (Date.now() > end) throw new Error(`not true within ${timeout} ms: ${test}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

async function firstFrameCount(page: Page): Promise<number> {
  await until(page, `window.__firstFrame !== undefined`);
  return page.evaluate('window.__firstFrame') as Promise<number>;
}

describe('long tables across a page switch', () => {
  it('comes back from another page scrolled where it was, drawing only the rows in view for the first frame', async () => {
    const { page, errors } = await app.open('#/family', { ready: '[data-testid="family-table"] tbody tr[aria-rowindex="2"]' });
    await openLongFamily(page);
    const codes = [...book.variants].map((v) => v.code);
    await page.locator('[data-testid="family-table"] tbody tr[aria-rowindex] th').first().waitFor();
    const atStart = await gridState(page);

    // Scrolled to the middle of the family: far fewer rows are drawn than the family has.
    await page.evaluate(`(() => { const { frame, rows } = ${GRID}; frame.scrollTop = rows[0].getBoundingClientRect().height * 60; })()`);
    await until(page, `(() => { const { rows } = ${GRID}; return rows.some((tr) => Number(tr.getAttribute('aria-rowindex')) === 62); })()`);
    await page.waitForTimeout(200);
    const before = await gridState(page);
    expect(before.rows).toBeLessThan(book.variants.length / 2);
    expect(before.scrollTop).toBeGreaterThan(0);
    expect(codes).toContain(before.top);
    expect(before.top).not.toBe(atStart.top);

    await railTo(page, '#/parts');
    await pageLoaded(page, 'Parts');

    // The first frame after coming back: counted in an animation frame asked for as the page changes, which runs
    // before the grid's own (that measures it and adds the spare rows after the frame).
    await countAtFirstFrame(page, `${GRID}.rows.length`);
    await railTo(page, '#/family');
    const firstFrame = await firstFrameCount(page);
    expect(firstFrame).toBeGreaterThan(0);
    expect(firstFrame).toBeLessThanOrEqual(before.fits + 1);
    expect(firstFrame).toBeLessThan(before.rows);

    // Then it is back where it was, with its spare rows drawn again.
    await until(page, `(() => { const { frame, rows } = ${GRID}; return frame.scrollTop === ${before.scrollTop} && rows.length === ${before.rows}; })()`);
    const after = await gridState(page);
    expect(after.top).toBe(before.top);
    expect(errors).toEqual([]);
  });

  it('draws the Family page once when the person comes back, its folded at-a-glance table left unmade', async () => {
    // More variants than a table draws at once: the at-a-glance table, made, would draw its rows a slice per frame.
    const family = referenceFamily({ variants: ROWS_AT_ONCE + 50, lines: 20 }).book;
    const { page, errors } = await app.open('#/family', { ready: '[data-testid="family-table"] tbody tr[aria-rowindex="2"]' });
    await openLongFamily(page, family);
    // The figures are in: the first variant row's last cell (a unit cost) shows a figure.
    await until(page, `(() => { const { rows } = ${GRID}; const cells = rows[0] ? rows[0].querySelectorAll('td') : []; return cells.length > 0 && /\\d/.test(cells[cells.length - 1].textContent); })()`);
    const FAMILY = `document.querySelector('rb-app').shadowRoot.querySelector('rb-family-page').shadowRoot`;
    // A family this long folds its at-a-glance table away.
    expect(await page.evaluate(`${FAMILY}.querySelector('[data-testid="family-glance-fold"]') !== null`)).toBe(true);
    expect(await page.evaluate(`${FAMILY}.querySelectorAll('[data-testid="family-glance"] tbody tr').length`)).toBe(0);

    await railTo(page, '#/parts');
    await pageLoaded(page, 'Parts');
    // Every drawing of the Family page from here on is counted.
    await page.evaluate(`(() => {
      const proto = customElements.get('rb-family-page').prototype;
      const update = proto.update;
      window.__familyDrawn = 0;
      proto.update = function (...args) { window.__familyDrawn += 1; return update.apply(this, args); };
    })()`);
    await railTo(page, '#/family');
    await pageLoaded(page, 'Family');
    // Time for a table drawn a slice per frame to draw its slices (seven frames for 200 rows), had it been made.
    await page.waitForTimeout(1500);
    // Once for coming back; a second time only if figures arrived meanwhile. Made while folded, the table drew the
    // whole page again for each slice of its rows (7 drawings).
    expect(await page.evaluate('window.__familyDrawn')).toBeLessThanOrEqual(2);

    // Opened, the table shows every variant.
    await page.locator('[data-testid="family-glance-fold"] summary').click();
    await until(page, `${FAMILY}.querySelectorAll('[data-testid="family-glance"] tbody tr').length === ${family.variants.length}`);
    expect(errors).toEqual([]);
  });

  it('draws the Build page\'s lines again a slice per frame when the person comes back to it', async () => {
    const { page, errors } = await app.open('#/family', { ready: '[data-testid="family-table"] tbody tr[aria-rowindex="2"]' });
    await openLongFamily(page);
    const LINES = `document.querySelector('rb-app').shadowRoot.querySelector('rb-build-page').shadowRoot.querySelectorAll('[data-testid="build-lines"] tbody tr').length`;
    // The first visit draws the lines at once and counts their standing across the variants after that frame (the
    // page's code is loaded ahead while the Family page is idle: the page is then made in the task of the switch).
    await until(page, `customElements.get('rb-build-page') !== undefined`);
    const STATUS = `[...document.querySelector('rb-app').shadowRoot.querySelector('rb-build-page').shadowRoot.querySelectorAll('[data-testid="line-status"]')].map((td) => td.textContent.trim())`;
    await countAtFirstFrame(page, `${STATUS}.filter((t) => t === 'being counted…').length`);
    await railTo(page, '#/build');
    expect(await firstFrameCount(page)).toBe(ROWS_PER_FRAME);
    await pageLoaded(page, 'Build');
    await until(page, `${LINES} === ${book.buildLines.length}`);
    await page.waitForFunction((variants) => {
      const build = document.querySelector('rb-app')!.shadowRoot!.querySelector('rb-build-page')!.shadowRoot!;
      const shown = [...build.querySelectorAll('[data-testid="line-status"]')].map((td) => td.textContent!.trim());
      return shown.every((t) => new RegExp(`^\\d+ of ${variants}$`).test(t) || t.startsWith('fails for'));
    }, book.variants.length);
    await page.evaluate('delete window.__firstFrame');

    await railTo(page, '#/parts');
    await pageLoaded(page, 'Parts');
    await countAtFirstFrame(page, LINES);
    await railTo(page, '#/build');
    const firstFrame = await firstFrameCount(page);
    expect(firstFrame).toBe(ROWS_PER_FRAME);

    // The rest follow, a slice per frame, and the table is whole again.
    await until(page, `${LINES} === ${book.buildLines.length}`);
    expect(errors).toEqual([]);
  });
});
