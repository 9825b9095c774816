// Compare page: chosen variants side by side (key parameters, worst check, unit cost at each run size), their cost
// split by category as stacked bars, cost against run size as curves, the build lines that make two of them differ
// with their cost effect, and what-if edits (a quote price, a rate, a cost setting, the run sizes) tried on a scratch
// costing workbook so every figure moves at once without saving, until the person keeps or discards them.
// The scratch workbook and the what-if edits sit in CompareController; each view is an element of its own.
import { LitElement, css, html, nothing } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, Variant } from '../domain/book.ts';
import { nextTask } from '../domain/slices.ts';
import { BookController } from './book-context.ts';
import { whatIfCount } from './build-costing.ts';
import { CompareController } from './compare-controller.ts';
import type { NoticeDetail } from './rb-book-menu.ts';
import './rb-compare-curves.ts';
import './rb-compare-difference.ts';
import './rb-compare-side.ts';
import './rb-compare-split.ts';
import './rb-compare-whatif.ts';
import { pageStyles, problemStyles } from './styles.ts';

/** Variants chosen when the page opens: all of a small family, else the first few. */
const FIRST_FEW = 4;
/** Most variants drawn as columns, bars and curves at once; more are counted, not drawn (a chart of 200 lines reads as none). */
const MAX_SHOWN = 12;
/** The views below the choice: side by side, what-if, split, curves, difference. */
const VIEWS = 5;

@customElement('rb-compare-page')
export class RbComparePage extends LitElement {
  static override styles = [
    pageStyles,
    problemStyles,
    css`
      .choices {
        display: flex;
        flex-wrap: wrap;
        gap: 0.3rem 1rem;
        margin: 0 0 0.6rem;
        font-size: 0.9rem;
      }
      .choices label {
        font-family: var(--rb-mono);
        font-size: 0.84rem;
        white-space: nowrap;
      }
      /* Sticky in the page's own scroll, so it must stay in this element rather than in a view. */
      .whatif-bar {
        position: sticky;
        top: 0;
        z-index: 3;
        display: flex;
        flex-wrap: wrap;
        gap: 0.6rem;
        align-items: baseline;
        padding: 0.45rem 0.8rem;
        margin: 0 0 1rem;
        border: 2px dashed var(--rb-margin);
        background: var(--rb-margin-bg);
      }
      .whatif-bar strong {
        color: var(--rb-margin);
      }
    `,
  ];

  private readonly books = new BookController(this, { figures: true });
  private readonly costs = new CompareController(this, this.books, () => this.views >= VIEWS);
  /**
   * Views drawn so far. The page shown afresh draws the choice and the side-by-side table first, then one more view
   * in each task after the frame that showed the one before: drawn and laid out at once, the five views of a large
   * family held the page's thread for one long task when switching to it.
   */
  @state() private views = 1;
  private staging = 0;

  @state() private chosen: string[] | undefined;
  @state() private splitRun = 0;

  override willUpdate(): void {
    const book = this.books.book;
    const service = this.books.service;
    if (!book || !service) return;
    const ids = new Set(book.variants.map((v) => v.id));
    const had = this.chosen ?? [];
    let chosen = had.filter((id) => ids.has(id));
    // The first few when the page opens, or when every chosen variant is gone; "None" chooses none and stays so.
    if (this.chosen === undefined || (had.length > 0 && chosen.length === 0 && book.variants.length > 0)) {
      chosen = book.variants.slice(0, book.variants.length <= FIRST_FEW + 2 ? book.variants.length : FIRST_FEW).map((v) => v.id);
    }
    if (chosen.length !== this.chosen?.length) this.chosen = chosen;
    this.costs.sync(chosen.slice(0, MAX_SHOWN));
    const runs = this.costs.runSizes(book);
    if (!runs.includes(this.splitRun)) this.splitRun = runs[Math.min(1, runs.length - 1)] ?? 0;
  }

  override updated(): void {
    if (this.views >= VIEWS || this.staging !== 0) return;
    this.staging = requestAnimationFrame(() => {
      void nextTask().then(() => {
        this.staging = 0;
        this.views++;
      });
    });
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    if (this.staging !== 0) cancelAnimationFrame(this.staging);
    this.staging = 0;
  }

  override connectedCallback(): void {
    super.connectedCallback();
    // Staging stopped while the page was away: it picks up where it was.
    if (this.hasUpdated && this.views < VIEWS) this.requestUpdate();
  }

  override render() {
    const book = this.books.book;
    if (!book || !this.chosen) return html``;
    const all = this.chosen.map((id) => book.variants.find((v) => v.id === id)).filter((v): v is Variant => v !== undefined);
    const chosen = all.slice(0, MAX_SHOWN);
    if (book.variants.length === 0) return html`<p class="empty">No variants yet; add them on the Family page.</p>`;
    const c = this.costs;
    const n = whatIfCount(c.whatIf);
    const onRun = (e: HTMLElementEventMap['rb-compare-run']): void => {
      this.splitRun = e.detail.run;
    };
    if (chosen.length === 0) {
      return html`${n > 0 || c.keepError ? this.renderWhatIfBar(n) : ''}${this.renderChoice(book)}
        <p class="empty" data-testid="compare-none">No variants chosen: tick the variants to compare above.</p>`;
    }
    return html`${n > 0 || c.keepError ? this.renderWhatIfBar(n) : ''}${this.renderChoice(book)}
      ${c.working ? html`<p class="empty" role="status" data-testid="compare-working">Working out the figures…</p>` : ''}
      <rb-compare-side .book=${book} .chosen=${chosen} .costs=${c} .revision=${c.revision}></rb-compare-side>
      ${this.views > 1
        ? html`<rb-compare-whatif .book=${book} .chosen=${chosen} .costs=${c} .revision=${c.revision} .run=${this.splitRun}></rb-compare-whatif>`
        : nothing}
      ${this.views > 2
        ? html`<rb-compare-split .book=${book} .chosen=${chosen} .costs=${c} .revision=${c.revision} .run=${this.splitRun} @rb-compare-run=${onRun}></rb-compare-split>`
        : nothing}
      ${this.views > 3 ? html`<rb-compare-curves .book=${book} .chosen=${chosen} .costs=${c} .revision=${c.revision}></rb-compare-curves>` : nothing}
      ${this.views > 4
        ? html`<rb-compare-difference
            .book=${book}
            .chosen=${chosen}
            .costs=${c}
            .revision=${c.revision}
            .run=${this.splitRun}
            @rb-compare-run=${onRun}
          ></rb-compare-difference>`
        : nothing}`;
  }

  private renderChoice(book: Book): TemplateResult {
    const chosen = new Set(this.chosen);
    const set = (ids: string[]) => (this.chosen = book.variants.filter((v) => ids.includes(v.id)).map((v) => v.id));
    return html`<section class="sheet" aria-labelledby="choose-h">
      <h2 id="choose-h">Variants compared</h2>
      <p class="why">
        ${chosen.size} of ${book.variants.length} variants chosen. Every figure below is for these${chosen.size > MAX_SHOWN
          ? html`; <strong>only the first ${MAX_SHOWN} are drawn</strong>, choose fewer to see the others`
          : ''}.
      </p>
      <div class="choices" role="group" aria-label="Variants compared" data-testid="compare-choices">
        ${book.variants.map(
          (v) => html`<label title=${v.name}
            ><input
              type="checkbox"
              .checked=${live(chosen.has(v.id))}
              @change=${(e: Event) =>
                set((e.target as HTMLInputElement).checked ? [...chosen, v.id] : [...chosen].filter((id) => id !== v.id))}
            />
            ${v.code}</label
          >`,
        )}
      </div>
      <div class="toolbar">
        <button type="button" @click=${() => set(book.variants.map((v) => v.id))}>All</button>
        <button type="button" @click=${() => set(book.variants.slice(0, FIRST_FEW).map((v) => v.id))}>First ${FIRST_FEW}</button>
        <button type="button" @click=${() => set([])}>None</button>
      </div>
    </section>`;
  }

  private renderWhatIfBar(n: number): TemplateResult {
    return html`<div class="whatif-bar" role="status" data-testid="whatif-bar">
      ${n > 0
        ? html`<strong>⚑ What-if: ${n} ${n === 1 ? 'edit' : 'edits'} tried, not saved.</strong>
            <span>Every figure on this page shows them; other pages and the Book do not.</span>
            <button type="button" class="primary" @click=${this._onKeep}>Keep in the Book</button>
            <button type="button" @click=${() => this.costs.discard()}>Discard</button>`
        : ''}
      ${this.costs.keepError ? html`<span class="problem" role="alert">${this.costs.keepError}</span>` : ''}
    </div>`;
  }

  private readonly _onKeep = async (): Promise<void> => {
    const n = await this.costs.keep();
    if (n === undefined) return;
    this.dispatchEvent(
      new CustomEvent<NoticeDetail>('rb-notice', {
        detail: { tone: 'done', title: `${n} what-if ${n === 1 ? 'edit' : 'edits'} kept in the Book`, lines: [] },
        bubbles: true,
        composed: true,
      }),
    );
  };
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-compare-page': RbComparePage;
  }
}
