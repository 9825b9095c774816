// The page registry: every fixed page of a Book in rail order. A new page is one element file plus one line here
// (give it `tag` and `load`); a page without them shows its description until it is built.
import { afterFiguresShown } from './first-figures.ts';
import { onIdle } from '../domain/slices.ts';

export interface PageEntry {
  /** Route segment: the page lives at `#/<slug>`. */
  slug: string;
  title: string;
  /** One line saying what the page is for, shown under its heading. */
  blurb: string;
  /** What the page will hold, shown while it is not built yet. */
  plan?: string;
  /** Custom element that renders the page; loaded on first visit. */
  tag?: string;
  load?: () => Promise<unknown>;
  /** Pages about mains circuits carry the safety caution. */
  mains?: boolean;
}

export const PAGES: readonly PageEntry[] = [
  {
    slug: 'family',
    title: 'Family',
    blurb: 'The variants of the family, one row each, with the parameters that set their circuit and rating.',
    tag: 'rb-family-page',
    load: () => import('./rb-family-page.ts'),
    mains: true,
  },
  {
    slug: 'parts',
    title: 'Parts',
    blurb: 'Every component the family may use: maker part number, kind, principal value, ratings and package.',
    tag: 'rb-parts-page',
    load: () => import('./rb-parts-page.ts'),
  },
  {
    slug: 'suppliers',
    title: 'Suppliers',
    blurb: 'Who sells the parts, in which currency, and at what rate that currency converts to the Book’s own.',
    tag: 'rb-suppliers-page',
    load: () => import('./rb-suppliers-page.ts'),
  },
  {
    slug: 'quotes',
    title: 'Quotes',
    blurb: 'Supplier offers per part: price breaks, minimum order, pack quantity, lead time and validity.',
    plan:
      'A table of quotes per part and supplier with their price breaks, MOQ, pack quantity, lead time, date and ' +
      'source file, with expired and superseded quotes marked.',
    tag: 'rb-quotes-page',
    load: () => import('./rb-quotes-page.ts'),
  },
  {
    slug: 'build',
    title: 'Build',
    blurb: 'The family bill of materials: which part each line uses, how many, and for which variants.',
    plan:
      'Build lines with designators, part or part rule, quantity rule, applies-when rule, cost category and ' +
      'attrition, and a per-variant view of the lines that apply.',
    tag: 'rb-build-page',
    load: () => import('./rb-build-page.ts'),
    mains: true,
  },
  {
    slug: 'checks',
    title: 'Checks',
    blurb: 'Engineering checks evaluated for every variant, with pass, margin or fail and the figure behind it.',
    tag: 'rb-checks-page',
    load: () => import('./rb-checks-page.ts'),
    mains: true,
  },
  {
    slug: 'runs',
    title: 'Runs',
    blurb: 'Production runs: a variant, a quantity and a date, costed from the quotes into a costed BOM.',
    plan:
      'Runs with their variant, quantity and wanted date; for each, the costed BOM (need, buy quantity, chosen ' +
      'quote, unit and extended cost, leftover stock) and the unit cost split by category.',
    tag: 'rb-runs-page',
    load: () => import('./rb-runs-page.ts'),
    mains: true,
  },
  {
    slug: 'compare',
    title: 'Compare',
    blurb: 'Variants side by side: parameters, check results and unit cost at each run size.',
    plan: 'Chosen variants in columns with their parameters, check results and unit cost at the Book’s run sizes.',
    tag: 'rb-compare-page',
    load: () => import('./rb-compare-page.ts'),
    mains: true,
  },
  {
    slug: 'plan',
    title: 'Plan',
    blurb: 'Planned runs together: what each part needs by when, what stock and open orders cover, and what to order from whom.',
    tag: 'rb-plan-page',
    load: () => import('./rb-plan-page.ts'),
  },
  {
    slug: 'orders',
    title: 'Orders',
    blurb: 'Orders placed with suppliers: receive them whole or in part, or cancel what is still to come.',
    tag: 'rb-orders-page',
    load: () => import('./rb-orders-page.ts'),
  },
  {
    slug: 'stock',
    title: 'Stock',
    blurb: 'Parts on hand as the sum of their movements, each part’s history, counts, scrap and corrections.',
    tag: 'rb-stock-page',
    load: () => import('./rb-stock-page.ts'),
  },
  {
    slug: 'prices',
    title: 'Price lists',
    blurb: 'Customer price lists: a margin or markup and a currency each, and every variant’s price at each run size.',
    tag: 'rb-price-lists-page',
    load: () => import('./rb-price-lists-page.ts'),
  },
  {
    slug: 'import',
    title: 'Import',
    blurb: 'Bring in a supplier’s price file, map its columns once, and review the quotes before they are kept.',
    plan:
      'A price file drop area, a column mapping saved per supplier, a preview of the rows that will become quotes ' +
      'with problems marked, and a list of past imports that can be undone.',
    tag: 'rb-import-page',
    load: () => import('./rb-import-page.ts'),
  },
  {
    slug: 'export',
    title: 'Export',
    blurb: 'Costed BOMs and purchase lists as CSV files, and the whole Book as a file.',
    plan: 'Downloads of the costed BOM and purchase list of a run as CSV, and of the whole Book as a Book file.',
    tag: 'rb-export-page',
    load: () => import('./rb-export-page.ts'),
    mains: true,
  },
  {
    slug: 'settings',
    title: 'Rates',
    blurb: 'Base currency, exchange rates, run sizes and the labour, test, overhead, margin and attrition every cost uses.',
    tag: 'rb-settings-page',
    load: () => import('./rb-settings-page.ts'),
  },
  {
    slug: 'team',
    title: 'Team',
    blurb: 'Share this Book with your team through a sync server, see what is synced, and resolve changes made apart.',
    tag: 'rb-sharing-page',
    load: () => import('./rb-sharing-page.ts'),
  },
];

/**
 * The first view: what Rungbook is for and the first steps. Shown at the first start and linked from the top of the
 * rail; not one of the Book's pages, so the rail's numbering of those stays as it is.
 */
export const START_PAGE: PageEntry = {
  slug: 'start',
  title: 'Start here',
  blurb: 'What Rungbook does, how a Book fits together, and three ways to begin.',
  tag: 'rb-start-page',
  load: () => import('./rb-start-page.ts'),
  mains: true,
};

/** Route of a user notebook page. */
export function notebookRoute(pageId: string): string {
  return `#/notebook/${encodeURIComponent(pageId)}`;
}

export type Route =
  | { kind: 'page'; entry: PageEntry }
  | { kind: 'notebook'; pageId: string }
  | { kind: 'unknown'; hash: string };

/** Reads a location hash (`#/parts`, `#/notebook/<id>`); an empty hash is the first page. */
export function parseRoute(hash: string): Route {
  const path = hash.replace(/^#\/?/, '');
  if (path === '') return { kind: 'page', entry: PAGES[0]! };
  const [head, ...rest] = path.split('/');
  if (head === 'notebook' && rest.length === 1 && rest[0]) {
    try {
      return { kind: 'notebook', pageId: decodeURIComponent(rest[0]) };
    } catch {
      return { kind: 'unknown', hash };
    }
  }
  if (head === START_PAGE.slug && rest.length === 0) return { kind: 'page', entry: START_PAGE };
  const entry = PAGES.find((p) => p.slug === head && rest.length === 0);
  return entry ? { kind: 'page', entry } : { kind: 'unknown', hash };
}

let loadingAhead = false;

/**
 * Loads the code of the pages not visited yet, one page per idle moment, in rail order: a page switched to later is
 * then drawn at once, rather than its code being read and run in the task that draws it. Starts once a page shows
 * its figures (first-figures.ts, so no page imports this registry), or a while after the start; once.
 */
export function loadPagesAhead(): void {
  if (loadingAhead || typeof window === 'undefined') return;
  loadingAhead = true;
  const queue = PAGES.filter((p) => p.tag && p.load);
  const idle = (then: () => void): void => onIdle(then, 5000, { afterMs: 50 });
  const next = (): void => {
    const page = queue.shift();
    if (!page) return;
    if (customElements.get(page.tag!)) return next();
    page.load!().then(
      () => idle(next),
      () => idle(next),
    );
  };
  idle(next);
}

if (typeof window !== 'undefined') afterFiguresShown(loadPagesAhead);
