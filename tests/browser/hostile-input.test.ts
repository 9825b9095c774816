// A Book file full of markup and script, opened through the Book menu in real Chromium: every page shows the text as
// text, nothing runs, no element or request comes out of it, and no request leaves the app's origin on a full tour.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { Book } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { serializeBook } from '../../src/io/book-file.ts';
import { PAGES, notebookRoute } from '../../src/ui/pages.ts';
import { AppUnderTest, pageLoaded, railTo, readerText } from './harness.ts';

const baseUrl = inject('baseUrl');

const IMG = '<img src=x onerror="window.__rbHostile=(window.__rbHostile||0)+1">';
const SCRIPT = '<script>window.__rbHostile=99</script>';
const SVG = '"><svg onload="window.__rbHostile=7"></svg>';

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

function hostileBook(): Book {
  const book = demoBook();
  book.settings = { ...book.settings, bookName: `Book ${SCRIPT}`, company: `Firm ${IMG}` };
  book.parts = book.parts.map((p, i) =>
    i === 0 ? { ...p, mpn: `${p.mpn}${IMG}`, description: SCRIPT, maker: SVG, notes: IMG } : i === 1 ? { ...p, description: IMG } : p,
  );
  book.suppliers = book.suppliers.map((s, i) => (i === 0 ? { ...s, name: `${s.name} ${SCRIPT}`, notes: IMG } : s));
  book.pages = [
    {
      id: 'page_hostile',
      rev: 0,
      title: `Notes ${IMG}`,
      position: 0,
      sections: [{ heading: SCRIPT, text: SVG, grid: [[IMG, SCRIPT], ['=1+1', SVG]] }],
    },
  ];
  return book;
}

/** What the whole document, shadow roots included, holds that a hostile string could have made. */
async function made(page: Page): Promise<{ imgX: number; scripts: number; handlers: number; svg: number; ran: unknown }> {
  return page.evaluate(() => {
    const out = { imgX: 0, scripts: 0, handlers: 0, svg: 0, ran: (window as unknown as { __rbHostile?: unknown }).__rbHostile };
    const roots: (Document | ShadowRoot)[] = [document];
    while (roots.length) {
      const root = roots.pop()!;
      for (const el of root.querySelectorAll('*')) {
        if (el.shadowRoot) roots.push(el.shadowRoot);
        if (el.tagName === 'IMG' && el.getAttribute('src') === 'x') out.imgX++;
        if (el.tagName === 'SCRIPT' && (el.textContent ?? '').includes('__rbHostile')) out.scripts++;
        if (el.tagName.toLowerCase() === 'svg' && el.hasAttribute('onload')) out.svg++;
        for (const a of el.getAttributeNames()) if (/^on/i.test(a)) out.handlers++;
      }
    }
    return out;
  });
}

async function openFile(page: Page, name: string, text: string): Promise<void> {
  await page.locator('rb-book-menu input[type="file"]').setInputFiles({ name, mimeType: 'application/json', buffer: Buffer.from(text) });
  await page.getByRole('button', { name: 'Replace with the file' }).click();
  await page.locator('[data-testid="notice"]', { hasText: `Opened ${name}` }).waitFor();
}

describe('hostile text in a Book', () => {
  it('shows markup and script from a Book file as text on every page and runs none of it', async () => {
    const session = await app.start();
    const { page, errors, foreignRequests } = session;
    const origin = new URL(baseUrl).origin;
    const madeUp: string[] = [];
    page.on('request', (r) => {
      const u = new URL(r.url());
      if (u.origin === origin && /\/x$/.test(u.pathname)) madeUp.push(r.url());
    });
    await page.goto(`${baseUrl}#/parts`);
    await page.locator('[data-testid="parts-table"]').waitFor();
    await openFile(page, 'hostile.rungbook.json', serializeBook(hostileBook()));

    // The strings are on screen exactly as written.
    await page.locator('[data-testid="parts-table"] tbody tr', { hasText: IMG }).first().waitFor();
    await page.locator('[data-testid="parts-table"] tbody tr', { hasText: SCRIPT }).first().waitFor();
    await expect(page.locator('[data-testid="book-name"]').textContent()).resolves.toBe(`Book ${SCRIPT} · Firm ${IMG}`);

    const tour = [...PAGES.map((p) => ({ href: `#/${p.slug}`, title: p.title })), { href: notebookRoute('page_hostile'), title: '' }];
    for (const stop of tour) {
      await railTo(page, stop.href);
      await pageLoaded(page, stop.title);
      const m = await made(page);
      expect(m, stop.href).toEqual({ imgX: 0, scripts: 0, handlers: 0, svg: 0, ran: undefined });
    }
    // The notebook page shows its title, heading, text and cells as text.
    await page.locator('main h1', { hasText: `Notes ${IMG}` }).waitFor();
    for (const text of [SCRIPT, SVG]) await page.locator('main', { hasText: text }).waitFor();
    await railTo(page, '#/suppliers');
    await page.locator('[data-testid="suppliers-table"] tbody tr', { hasText: SCRIPT }).waitFor();

    await page.reload();
    await page.locator('[data-testid="suppliers-table"]').waitFor();
    expect(await made(page)).toEqual({ imgX: 0, scripts: 0, handlers: 0, svg: 0, ran: undefined });
    expect(madeUp).toEqual([]);
    // A blocked inline script or handler would be reported on the console under the page's CSP.
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });

  it('the page is served under a Content-Security-Policy with no inline script and no remote origin but a sync server', async () => {
    const { page, errors } = await app.open('#/family');
    const csp = await page.locator('meta[http-equiv="Content-Security-Policy"]').getAttribute('content');
    expect(csp).not.toBeNull();
    const directives = new Map(
      csp!.split(';').map((d) => {
        const [name, ...values] = d.trim().split(/\s+/);
        return [name!, values] as const;
      }),
    );
    expect(directives.get('default-src')).toEqual(["'self'"]);
    expect(directives.get('script-src')).toEqual(["'self'"]);
    expect(directives.get('object-src')).toEqual(["'none'"]);
    // Only connections may go further: to a shared Book's sync server, which the person names on the Team page — on
    // this machine (the team server listens on loopback) or over TLS. Scripts, styles, images and workers stay local.
    expect(directives.get('connect-src')).toEqual(["'self'", 'http://127.0.0.1:*', 'http://localhost:*', 'https:']);
    for (const [name, values] of directives) {
      if (name === 'connect-src') continue;
      for (const v of values) expect(v, `${name} ${v}`).toMatch(/^('self'|'none'|'unsafe-inline'|data:|blob:)$/);
      if (values.includes("'unsafe-inline'")) expect(name).toBe('style-src');
    }
    // No inline script in the built page: every script element loads a file of the app.
    const inline = await page.evaluate(() => [...document.querySelectorAll('script')].filter((s) => !s.src).length);
    expect(inline).toBe(0);
    // An inline script injected now is refused by the policy.
    const ran = await page.evaluate(async () => {
      const s = document.createElement('script');
      s.textContent = 'window.__rbInline = 1';
      document.body.append(s);
      await new Promise((r) => setTimeout(r, 50));
      return (window as unknown as { __rbInline?: number }).__rbInline;
    });
    expect(ran).toBeUndefined();
    expect(errors.some((e) => /Content Security Policy/.test(e))).toBe(true);
  });
});

describe('hostile formulas and names', () => {
  it('a notebook page whose cells double text shows the error in the cell and keeps its controls', async () => {
    const session = await app.start();
    const { page, errors } = session;
    await page.goto(`${baseUrl}#/parts`);
    await page.locator('[data-testid="parts-table"]').waitFor();
    const book = demoBook();
    // A1 = "xx", each cell below joins the one above to itself: 2^41 characters at the end, were nothing to stop it.
    const rows = [['xx'], ...Array.from({ length: 40 }, (_, i) => [`=A${i + 1}&A${i + 1}`])];
    book.pages = [{ id: 'page_doubling', rev: 0, title: 'Doubling', position: 0, sections: [{ heading: 'Growth', text: '', grid: rows }] }];
    await openFile(page, 'doubling.rungbook.json', serializeBook(book));
    await railTo(page, notebookRoute('page_doubling'));
    await page.locator('main h1', { hasText: 'Doubling' }).waitFor();
    const cell = (address: string) => page.locator(`rb-user-page button[data-cell="${address}"]`);
    // 2 · 2^13 = 16,384 characters in A14; A15 would pass the 32,767-character limit.
    await expect.poll(async () => readerText(await cell('A15').textContent())).toBe('#VALUE!');
    expect(await cell('A15').getAttribute('title')).toMatch(/the result would be 32,768 characters long/);
    expect(readerText(await cell('A41').textContent())).toBe('#VALUE!');
    expect(await cell('A14').getAttribute('aria-label')).toMatch(/^A14: x{16384}$/);

    // The page's own controls still work: it can be deleted.
    await page.getByRole('button', { name: 'delete page' }).click();
    await page.getByRole('button', { name: 'Delete the page' }).click();
    await expect.poll(() => page.locator(`nav a[href="${notebookRoute('page_doubling')}"]`).count()).toBe(0);
    expect(errors).toEqual([]);
  });

  it('the Family page refuses a pasted constructor column with a message and keeps working', async () => {
    const { page, errors } = await app.open('#/family');
    const grid = '[data-testid="family-table"]';
    await page.locator(`${grid} tbody tr`).first().waitFor();
    const demo = demoBook();
    await page.locator(grid).evaluate((el, t) => {
      const data = new DataTransfer();
      data.setData('text/plain', t);
      el.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true, composed: true }));
    }, 'code\tname\tconstructor\r\nPX-1\tOne\t5\r\n');
    await expect
      .poll(async () => readerText(await page.locator('rb-grid .message').textContent()))
      .toBe('Row 1 of the paste (a new variant), constructor: “constructor” is a name every object has built in; choose another. Nothing was pasted.');
    expect(await page.locator(`${grid} tbody tr`).count()).toBe(demo.variants.length);

    // The page still draws and works: a sound paste into the same grid goes in.
    await page.locator(grid).evaluate((el, t) => {
      const data = new DataTransfer();
      data.setData('text/plain', t);
      el.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true, composed: true }));
    }, 'code\tname\tload_w\r\nPX-1\tOne\t60\r\n');
    await expect.poll(() => page.locator(`${grid} tbody tr`).count()).toBe(demo.variants.length + 1);
    const keys = await page.locator(`${grid} thead th`).evaluateAll((ths) => ths.map((th) => th.getAttribute('data-key')));
    expect(keys).not.toContain('constructor');
    expect(errors).toEqual([]);
  });
});
