// The first view: says what Rungbook is for, how the pages of a Book hang together, and offers three ways to begin
// (look around the demo Book, start a family of one's own, open a Book file). Shown at the first start; the rail
// links it for later. Replacing the Book goes through the Book menu's own items, so their questions and checks apply.
import { LitElement, css, html } from 'lit';
import { customElement } from 'lit/decorators.js';
import { BookController } from './book-context.ts';
import { pageStyles } from './styles.ts';

/** Asks the shell to run a Book menu item, as if it were chosen in the rail. */
export interface BookActionDetail {
  action: 'open' | 'empty';
}

/** The pages of a Book in the order a newcomer meets them, each with what it answers. */
const TOUR = [
  { slug: 'family', title: 'Family', says: 'the variants, one row each, and the parameters that set their circuit' },
  { slug: 'parts', title: 'Parts', says: 'every component the family may use, with its ratings' },
  { slug: 'build', title: 'Build', says: 'which part each position takes, and for which variants' },
  { slug: 'checks', title: 'Checks', says: 'is each variant electrically sound: pass, margin or fail, with the figure behind it' },
  { slug: 'quotes', title: 'Quotes', says: 'what the suppliers ask, at which quantities' },
  { slug: 'runs', title: 'Runs', says: 'a variant built in a quantity: its costed BOM, purchase list and run sheet' },
] as const;

@customElement('rb-start-page')
export class RbStartPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      :host {
        display: block;
        max-width: 62rem;
      }
      .lead {
        font-size: 1.05rem;
        line-height: 1.5;
        margin: 0 0 1rem;
        max-width: 52rem;
      }
      ol.flow {
        list-style: none;
        margin: 0;
        padding: 0;
        display: grid;
        grid-template-columns: repeat(auto-fit, minmax(13rem, 1fr));
        gap: 0.5rem;
        counter-reset: step;
      }
      ol.flow li {
        border-top: 3px solid var(--rb-accent);
        padding: 0.35rem 0.2rem 0;
        font-size: 0.9rem;
      }
      ol.flow li::before {
        counter-increment: step;
        content: counter(step) ' ';
        font-family: var(--rb-mono);
        color: var(--rb-na);
      }
      .ways {
        display: grid;
        grid-template-columns: repeat(auto-fit, minmax(17rem, 1fr));
        gap: 0.9rem;
      }
      .ways section.sheet {
        margin: 0;
        display: flex;
        flex-direction: column;
        gap: 0.4rem;
      }
      .ways section.sheet p {
        margin: 0;
        font-size: 0.92rem;
      }
      .ways .go {
        margin-top: auto;
        display: flex;
        flex-wrap: wrap;
        gap: 0.4rem 0.9rem;
        align-items: baseline;
      }
    `,
  ];

  private readonly books = new BookController(this);

  override render() {
    const book = this.books.book;
    const counts = book ? `${book.variants.length} variants, ${book.parts.length} parts and ${book.quotes.length} quotes` : '';
    return html`<p class="lead" data-testid="start-lead">
        Rungbook keeps one family of mains fan speed regulators in order. For every variant it holds the parameters, runs
        the engineering checks that keep it electrically sound, costs it from your suppliers’ quotes, and issues a costed
        BOM, a purchase list and a run sheet for each production run. It works offline: the Book lives in this browser
        until you download it as a file.
      </p>
      <section class="sheet" aria-labelledby="flow-h">
        <h2 id="flow-h">How a Book fits together</h2>
        <ol class="flow">
          ${TOUR.map((t) => html`<li><a href="#/${t.slug}">${t.title}</a>: ${t.says}.</li>`)}
        </ol>
      </section>
      <div class="ways" data-testid="start-ways">
        <section class="sheet" aria-labelledby="demo-h">
          <h2 id="demo-h">Look around the demo Book</h2>
          <p>This browser holds an invented demo family${counts ? html` (<span data-testid="start-counts">${counts}</span>)` : ''}. Change anything: the demo can be put back from the Book menu.</p>
          <p>Try a parameter on the Family page and watch its checks and unit costs follow.</p>
          <div class="go">
            <a href="#/family">See the variants</a>
            <a href="#/checks">the checks</a>
            <a href="#/runs">a costed run</a>
          </div>
        </section>
        <section class="sheet" aria-labelledby="own-h">
          <h2 id="own-h">Start your own family</h2>
          <p>Empty the Book (the built-in checks stay, your rates and currency too), then add your first variant on the Family page and your parts on the Parts page.</p>
          <p>Download the demo first if you want it again; Rungbook asks before anything is replaced.</p>
          <div class="go">
            <button type="button" class="primary" @click=${() => this.ask('empty')}>Start an empty Book…</button>
          </div>
        </section>
        <section class="sheet" aria-labelledby="file-h">
          <h2 id="file-h">Open a Book file</h2>
          <p>A Book file downloaded from Rungbook, yours or a colleague’s. It is checked whole before it replaces the Book in this browser.</p>
          <div class="go">
            <button type="button" class="primary" @click=${() => this.ask('open')}>Open a Book file…</button>
          </div>
        </section>
      </div>
      <p class="muted">This page stays a click away: <b>Start here</b> at the top of the rail.</p>`;
  }

  private ask(action: BookActionDetail['action']): void {
    this.dispatchEvent(new CustomEvent<BookActionDetail>('rb-book-action', { detail: { action }, bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-start-page': RbStartPage;
  }
  interface HTMLElementEventMap {
    'rb-book-action': CustomEvent<BookActionDetail>;
  }
}
