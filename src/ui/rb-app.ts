// The app shell: opens the Book, shares it with every page through context, and lays out the rail of pages, the
// save state, the Book menu and the current page (chosen by the location hash, so a reload keeps the page).
import { ContextProvider } from '@lit/context';
import { LitElement, css, html, nothing } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { keyed } from 'lit/directives/keyed.js';
import { afterNextFrame } from '../domain/slices.ts';
import { BOOK_FILE_EXTENSION } from '../io/book-file.ts';
import { StoredBookInvalid } from '../store/types.ts';
import { bookContext } from './book-context.ts';
import { BookService, DEFAULT_DB_NAME } from './book-service.ts';
import { CostingService, ENGINE_BUILD, warmFiguresWorker } from './costing-service.ts';
import { SHIPPED_FIGURES_FILE, followFigures, keptFiguresOf, startFigures } from './figures-keep.ts';
import { afterFiguresShown } from './first-figures.ts';
import { PAGES, START_PAGE, notebookRoute, parseRoute } from './pages.ts';
import { sessionShare } from './share-session.ts';
import type { PageEntry, Route } from './pages.ts';
import type { NoticeDetail } from './rb-book-menu.ts';
import type { BookActionDetail } from './rb-start-page.ts';
import './rb-book-menu.ts';
import './rb-mains-caution.ts';
import './rb-user-page-new.ts';
import './rb-save-state.ts';

type Phase =
  | { kind: 'opening' }
  | { kind: 'open'; service: BookService }
  | { kind: 'failed'; message: string; /** Set when the stored Book does not read: its records, to save and repair. */ stored?: StoredBookInvalid };

/** The notebook page's code, loaded when a notebook page is first shown. */
let notebookCode: Promise<unknown> | undefined;

@customElement('rb-app')
export class RbApp extends LitElement {
  static override styles = css`
    :host {
      display: grid;
      grid-template-columns: 15.5rem minmax(0, 1fr);
      min-height: 100vh;
      font-family: var(--rb-font);
      color: var(--rb-ink);
    }
    nav.rail {
      position: sticky;
      top: 0;
      height: 100vh;
      overflow-y: auto;
      display: flex;
      flex-direction: column;
      gap: 1.1rem;
      padding: 1rem 0.9rem 1rem 1.1rem;
      background: var(--rb-rail);
      border-right: 1px solid var(--rb-rule);
      box-shadow: inset -6px 0 0 -4px var(--rb-accent);
    }
    .brand {
      display: flex;
      gap: 0.55rem;
      align-items: center;
    }
    .brand img {
      width: 2rem;
      height: 2rem;
    }
    .brand b {
      display: block;
      font-size: 1.2rem;
      letter-spacing: 0.02em;
    }
    .brand small {
      display: block;
      font-size: 0.78rem;
      color: var(--rb-na);
      overflow-wrap: anywhere;
    }
    h2 {
      font-size: 0.72rem;
      text-transform: uppercase;
      letter-spacing: 0.14em;
      color: var(--rb-na);
      margin: 0 0 0.3rem;
      font-weight: 600;
    }
    ol {
      list-style: none;
      margin: 0;
      padding: 0;
      counter-reset: page;
    }
    ol li a {
      display: flex;
      gap: 0.5rem;
      align-items: baseline;
      padding: 0.2rem 0.4rem;
      border-radius: 3px;
      color: var(--rb-ink);
      text-decoration: none;
    }
    ol.pages li a::before {
      counter-increment: page;
      content: counter(page, decimal-leading-zero);
      font-family: var(--rb-mono);
      font-size: 0.7rem;
      color: var(--rb-na);
      min-width: 1.3rem;
    }
    ol.notebook li a::before {
      content: '¶';
      color: var(--rb-na);
      min-width: 1.3rem;
    }
    ol li a:hover {
      background: var(--rb-paper);
    }
    ol li a[aria-current='page'] {
      background: var(--rb-paper);
      color: var(--rb-accent-ink);
      font-weight: 600;
      box-shadow: inset 3px 0 0 var(--rb-accent);
    }
    a.start {
      display: block;
      padding: 0.3rem 0.5rem;
      border: 1px solid var(--rb-rule);
      border-radius: 3px;
      color: var(--rb-accent-ink);
      text-decoration: none;
      font-size: 0.9rem;
    }
    a.start:hover,
    a.start[aria-current='page'] {
      background: var(--rb-paper);
      box-shadow: inset 3px 0 0 var(--rb-accent);
    }
    ol li a .later {
      font-size: 0.7rem;
      color: var(--rb-na);
      font-style: italic;
      margin-left: auto;
    }
    .foot {
      margin-top: auto;
      border-top: 1px solid var(--rb-rule);
      padding-top: 0.7rem;
    }
    main {
      padding: 1.4rem 2.2rem 3rem;
      min-width: 0;
    }
    header h1 {
      font-size: 1.8rem;
      font-weight: 600;
      margin: 0;
    }
    header p {
      margin: 0.15rem 0 1.1rem;
      font-style: italic;
      color: var(--rb-na);
      max-width: 60rem;
    }
    .banner {
      display: flex;
      gap: 0.8rem;
      align-items: baseline;
      flex-wrap: wrap;
      padding: 0.55rem 0.8rem;
      margin: 0 0 1rem;
      border: 1px solid var(--rb-fail);
      border-left-width: 4px;
      background: var(--rb-fail-bg);
      max-width: 60rem;
    }
    .banner.done {
      border-color: var(--rb-pass);
      background: var(--rb-highlight);
    }
    .banner strong {
      flex: 1 1 20rem;
    }
    .banner ul {
      flex-basis: 100%;
      margin: 0.2rem 0 0;
      padding-left: 1.2rem;
      font-family: var(--rb-mono);
      font-size: 0.8rem;
    }
    button {
      font: inherit;
      font-size: 0.88rem;
      border: 1px solid var(--rb-accent);
      background: var(--rb-accent);
      color: var(--rb-paper);
      padding: 0.2rem 0.8rem;
      border-radius: 999px;
      cursor: pointer;
    }
    button.plain {
      background: transparent;
      color: var(--rb-accent-ink);
    }
    .placeholder {
      max-width: 48rem;
      padding: 0.9rem 1.1rem;
      border: 1px dashed var(--rb-rule);
      background: var(--rb-sheet);
    }
    .placeholder h2 {
      font-size: 0.9rem;
      color: var(--rb-accent-ink);
      letter-spacing: 0.06em;
    }
    .opening {
      padding: 3rem;
      grid-column: 1 / -1;
      font-style: italic;
    }
    .failed {
      grid-column: 1 / -1;
      padding: 3rem;
      max-width: 48rem;
    }
    @media (max-width: 760px) {
      :host {
        grid-template-columns: 1fr;
      }
      nav.rail {
        position: static;
        height: auto;
      }
    }
  `;

  @state() private phase: Phase = { kind: 'opening' };
  @state() private route: Route = parseRoute(location.hash);
  @state() private notice: NoticeDetail | undefined;
  @state() private pageElement: HTMLElement | undefined;
  /** Problems of a corrected Book file opened from the repair view. */
  @state() private repairProblems: string[] = [];
  private readonly provider = new ContextProvider(this, { context: bookContext });
  private readonly pageElements = new Map<string, HTMLElement>();
  private readonly onHash = (): void => {
    // A page switch: the new page draws first, the figures worker waits for it (not at the start, where the first
    // Book's figures never wait).
    if (this.phase.kind === 'open') CostingService.for(this.phase.service).holdWhileDrawing();
    this.go(parseRoute(location.hash));
  };
  private readonly onServiceChange = (): void => this.requestUpdate();

  override connectedCallback(): void {
    super.connectedCallback();
    window.addEventListener('hashchange', this.onHash);
    this.addEventListener('rb-notice', this._onNotice);
    this.addEventListener('rb-book-action', this._onBookAction);
    void this.open();
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    window.removeEventListener('hashchange', this.onHash);
    this.removeEventListener('rb-notice', this._onNotice);
    this.removeEventListener('rb-book-action', this._onBookAction);
    if (this.phase.kind === 'open') this.phase.service.close();
    this.stopKeeping?.();
  }

  /** Stops keeping the figures for the next start (see figures-keep.ts). */
  private stopKeeping: (() => void) | undefined;

  private async open(): Promise<void> {
    try {
      // The code of the page asked for loads while the Book is read (show() then finds it loaded; a failure is
      // reported there).
      if (this.route.kind === 'page') this.route.entry.load?.().catch(() => undefined);
      // Figures kept from the last start are read beside the Book, and shown at once if they are of this very Book.
      // On a first start, which shows the demo Book, the build ships its figures: fetched while the Book opens. When
      // either will likely be shown, the figures worker (a second of CPU to load and compile its engine) starts after
      // the first view; otherwise it loads and warms up while the Book is read. A first start's demo Book is written
      // once the first page is on screen.
      let pageShown!: () => void;
      const firstViewDone = new Promise<void>((resolve) => (pageShown = resolve));
      const openBook = (starterLikely?: Promise<boolean>): Promise<BookService> => BookService.open(DEFAULT_DB_NAME, { writeStarterAfter: firstViewDone, starterLikely });
      const start =
        ENGINE_BUILD === undefined ? undefined : await startFigures(DEFAULT_DB_NAME, `${import.meta.env.BASE_URL}${SHIPPED_FIGURES_FILE}`, openBook);
      const opening = start?.opening ?? openBook();
      void (start?.figures.likely ?? Promise.resolve(false)).then((likely) => likely || warmFiguresWorker());
      const service = await opening;
      const costing = CostingService.for(service);
      if (ENGINE_BUILD !== undefined) {
        const keptFigures = await keptFiguresOf(await start?.figures.kept, service.book, ENGINE_BUILD);
        const figures = keptFigures ?? (await keptFiguresOf(await start?.figures.shipped, service.book, ENGINE_BUILD));
        if (figures && costing.seed(figures)) afterFiguresShown(() => costing.catchUp());
        // Figures read from the kept store are not written back when the worker agrees; shipped ones are.
        this.stopKeeping = followFigures(costing, service.name, ENGINE_BUILD, { alreadyKept: keptFigures ? service.book : undefined });
      }
      // Figures are worked out off the page's thread from now on, while the first page's code still loads (seeded
      // figures are sent after the first view).
      costing.sync();
      service.addEventListener('change', this.onServiceChange);
      this.provider.setValue(service);
      this.phase = { kind: 'open', service };
      this.resumeSharing(service);
      // The first start in this browser, opened without a page named: the first view says what the tool is for.
      if (service.startedFresh && location.hash.replace(/^#\/?/, '') === '') {
        history.replaceState(null, '', `#/${START_PAGE.slug}`);
        this.route = parseRoute(location.hash);
      }
      this.go(this.route);
      // Whatever the first drawing did: every save queues behind the demo Book's write.
      void this.updateComplete.catch(() => undefined).then(afterNextFrame).then(pageShown);
    } catch (e) {
      const detail = e instanceof Error ? e.message : String(e);
      if (e instanceof StoredBookInvalid) {
        this.phase = { kind: 'failed', message: detail, stored: e };
        return;
      }
      this.phase = {
        kind: 'failed',
        message: `The Book could not be opened in this browser: ${detail}. Rungbook keeps Books in the browser's own storage (IndexedDB); private windows and some settings turn it off.`,
      };
    }
  }

  /** This tab was sharing the Book before a reload: the sharing picks up again (its code loads only then). */
  private resumeSharing(service: BookService): void {
    const kept = sessionShare(service.name);
    if (!kept) return;
    import('./team-sharing.ts')
      .then((m) => m.beginSharing(service, kept, 'resume'))
      .catch((e: unknown) => {
        const why = e instanceof Error ? e.message : String(e);
        this.notice = { tone: 'problem', title: 'Sharing did not pick up again after the reload', lines: [why, 'Resume it from the Team page; what changed here meanwhile is kept and sent then.'] };
      });
  }

  private go(route: Route): void {
    this.route = route;
    this.notice = undefined;
    this.show(route);
  }

  /** Shows the route's page: the element kept from an earlier visit, a new one, or one once its code has loaded. */
  private show(route: Route): void {
    if (route.kind !== 'page' || !route.entry.tag || !route.entry.load) {
      this.pageElement = undefined;
      return;
    }
    const { slug, tag, load } = route.entry;
    const cached = this.pageElements.get(slug);
    if (cached) {
      this.pageElement = cached;
      return;
    }
    if (customElements.get(tag)) {
      const el = document.createElement(tag);
      this.pageElements.set(slug, el);
      this.pageElement = el;
      return;
    }
    this.pageElement = undefined;
    load().then(
      () => {
        const el = this.pageElements.get(slug) ?? document.createElement(tag);
        this.pageElements.set(slug, el);
        if (this.route.kind === 'page' && this.route.entry.slug === slug) this.pageElement = el;
      },
      (e: unknown) => {
        this.notice = { tone: 'problem', title: `The ${route.entry.title} page could not be loaded`, lines: [String(e)] };
      },
    );
  }

  /** The Book replacement the kept pages were made for (see BookService.replacements). */
  private replacementSeen = 0;

  override willUpdate(): void {
    if (this.phase.kind !== 'open') return;
    const replaced = this.phase.service.replacements;
    if (replaced === this.replacementSeen) return;
    // The whole Book was replaced (empty Book, demo Book, opened file): every page's open forms, selections, drafts,
    // imports in progress and undo steps belong to a Book that is gone, so every page starts afresh.
    this.replacementSeen = replaced;
    this.pageElements.clear();
    this.show(this.route);
  }

  override render() {
    const phase = this.phase;
    if (phase.kind === 'opening') return html`<p class="opening">Opening the Book…</p>`;
    if (phase.kind === 'failed') {
      return html`<div class="failed" role="alert">
        <h1>Rungbook</h1>
        <p>${phase.message}</p>
        ${phase.stored ? this.renderRepair(phase.stored) : nothing}
      </div>`;
    }
    const service = phase.service;
    return html`${this.renderRail(service)}
      <main>${this.renderBanners(service)}${this.renderRoute(service)}</main>`;
  }

  /** The way out when the stored Book does not read: save its records as they are, then open a repaired file. */
  private renderRepair(stored: StoredBookInvalid): TemplateResult {
    const download = (): void => {
      const blob = new Blob([JSON.stringify(stored.stored, null, 1)], { type: 'application/json' });
      const a = document.createElement('a');
      a.href = URL.createObjectURL(blob);
      a.download = `stored-book${BOOK_FILE_EXTENSION}`;
      a.click();
      setTimeout(() => URL.revokeObjectURL(a.href), 10_000);
    };
    const open = async (e: Event): Promise<void> => {
      const file = (e.target as HTMLInputElement).files?.[0];
      if (!file) return;
      const result = await BookService.replaceStored(await file.text());
      if (result.ok) location.reload();
      else this.repairProblems = result.problems.map((p) => (p.path ? `${p.path}: ${p.message}` : p.message));
    };
    return html`<p>Nothing has been changed or deleted. Save the stored records as a file, correct the places named
        above in a text editor, and open the corrected file here; it replaces the stored Book once it reads whole.</p>
      <p>
        <button type="button" data-testid="repair-download" @click=${download}>Save the stored records as a file</button>
        <label>Open a corrected Book file <input type="file" accept=".json,application/json" data-testid="repair-open" @change=${open} /></label>
      </p>
      ${this.repairProblems.length
        ? html`<ul data-testid="repair-problems">${this.repairProblems.map((p) => html`<li>${p}</li>`)}</ul>`
        : nothing}`;
  }

  private renderRail(service: BookService): TemplateResult {
    const book = service.book;
    const current = this.route;
    const pages = [...book.pages].sort((a, b) => a.position - b.position);
    return html`<nav class="rail" aria-label="Book pages">
      <div class="brand">
        <img src="/icon.svg" alt="" />
        <div>
          <b>Rungbook</b>
          <small data-testid="book-name">${book.settings.bookName}${book.settings.company ? ` · ${book.settings.company}` : ''}</small>
        </div>
      </div>
      <a class="start" href="#/${START_PAGE.slug}" aria-current=${current.kind === 'page' && current.entry === START_PAGE ? 'page' : nothing}
        >Start here: what Rungbook is for</a
      >
      <div>
        <h2>Pages</h2>
        <ol class="pages">
          ${PAGES.map(
            (p) => html`<li>
              <a href="#/${p.slug}" aria-current=${current.kind === 'page' && current.entry === p ? 'page' : nothing}
                >${p.title}${p.tag ? '' : html`<span class="later">to come</span>`}</a
              >
            </li>`,
          )}
        </ol>
      </div>
      <div>
        <h2>Notebook</h2>
        <ol class="notebook">
          ${pages.map(
            (p) => html`<li>
              <a
                href=${notebookRoute(p.id)}
                aria-current=${current.kind === 'notebook' && current.pageId === p.id ? 'page' : nothing}
                >${p.title || '(untitled page)'}</a
              >
            </li>`,
          )}
        </ol>
        <rb-user-page-new></rb-user-page-new>
      </div>
      <div>
        <h2>Book</h2>
        <rb-book-menu></rb-book-menu>
      </div>
      <div class="foot">
        <rb-save-state></rb-save-state>
      </div>
    </nav>`;
  }

  private renderBanners(service: BookService): TemplateResult {
    const blocked = service.blocked
      ? html`<div class="banner" role="alert">
          <strong
            >A newer Rungbook opened this Book in another tab and upgraded its storage. This tab has stopped saving;
            reload it to go on working.</strong
          >
          <button type="button" @click=${() => location.reload()}>Reload this tab</button>
        </div>`
      : '';
    const s = service.status;
    const failed =
      s.state === 'failed'
        ? html`<div class="banner" role="alert" data-testid="save-problem">
            <strong>${s.reason}</strong>
            ${s.conflict
              ? html`<button type="button" @click=${() => void service.reload()}>Reload the Book</button>`
              : ''}
          </div>`
        : '';
    const merged =
      s.state !== 'failed' && s.merged
        ? html`<div class="banner done" role="status" data-testid="merge-notice">
            <strong>Saved, merged with another tab's change.</strong> ${s.merged}
            <button type="button" class="plain" @click=${() => service.dismissMerged()}>Dismiss</button>
          </div>`
        : '';
    const n = this.notice;
    const notice = n
      ? html`<div class="banner ${n.tone}" role=${n.tone === 'problem' ? 'alert' : 'status'} data-testid="notice">
          <strong>${n.title}</strong>
          <button type="button" class="plain" @click=${() => (this.notice = undefined)}>Dismiss</button>
          ${n.lines.length ? html`<ul>${n.lines.map((l) => html`<li>${l}</li>`)}</ul>` : ''}
        </div>`
      : '';
    return html`${blocked}${failed}${merged}${notice}`;
  }

  private renderRoute(service: BookService): TemplateResult {
    const route = this.route;
    if (route.kind === 'notebook') {
      const page = service.book.pages.find((p) => p.id === route.pageId);
      if (!page) return this.renderMissing(`No notebook page with id “${route.pageId}” in this Book.`);
      // The notebook's code (and its formula engine) loads when a notebook page is first shown: the element
      // upgrades once it is defined, keeping the page id set on it.
      notebookCode ??= import('./rb-user-page.ts').catch((e: unknown) => {
        notebookCode = undefined;
        this.notice = { tone: 'problem', title: 'The notebook page could not be loaded', lines: [e instanceof Error ? e.message : String(e)] };
      });
      // Keyed by the Book replacement, so a notebook page of a replaced Book starts afresh like the other pages.
      return html`${keyed(service.replacements, html`<rb-user-page .pageId=${page.id}></rb-user-page>`)}`;
    }
    if (route.kind === 'unknown') return this.renderMissing(`There is no page at “${route.hash}”.`);
    return this.renderPage(route.entry);
  }

  private renderPage(entry: PageEntry): TemplateResult {
    return html`<header>
        <h1>${entry.title}</h1>
        <p>${entry.blurb}</p>
      </header>
      ${entry.mains ? html`<rb-mains-caution></rb-mains-caution>` : ''}
      ${entry.tag
        ? (this.pageElement ?? html`<p class="muted">Loading…</p>`)
        : html`<div class="placeholder" data-testid="page-plan">
            <h2>Not built yet — this page will hold</h2>
            <p>${entry.plan ?? entry.blurb}</p>
          </div>`}`;
  }

  private renderMissing(message: string): TemplateResult {
    return html`<header><h1>Page not found</h1></header>
      <p>${message} <a href="#/${PAGES[0]!.slug}">Go to ${PAGES[0]!.title}</a>.</p>`;
  }

  private readonly _onNotice = (ev: CustomEvent<NoticeDetail>): void => {
    this.notice = ev.detail;
  };

  /** A Book menu item asked for from a page: the menu's own item runs, so its questions and file checks apply. */
  private readonly _onBookAction = (ev: CustomEvent<BookActionDetail>): void => {
    const label = ev.detail.action === 'open' ? 'Open a Book file…' : 'Start an empty Book…';
    const menu = this.renderRoot.querySelector('rb-book-menu');
    const item = [...(menu?.shadowRoot?.querySelectorAll('button') ?? [])].find((b) => b.textContent?.trim() === label);
    if (item) item.click();
    else this.notice = { tone: 'problem', title: `“${label}” is in the Book menu of the rail`, lines: [] };
  };
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-app': RbApp;
  }
}
