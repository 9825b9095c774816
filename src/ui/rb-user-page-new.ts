// The rail's "New page" action: adds an empty notebook page of the user's own to the Book and opens it.
import { LitElement, css, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { NotebookPage } from '../domain/book.ts';
import { newId } from '../domain/book.ts';
import { BookController } from './book-context.ts';
import { notebookRoute } from './pages.ts';

@customElement('rb-user-page-new')
export class RbUserPageNew extends LitElement {
  static override styles = css`
    :host {
      display: block;
      margin-top: 0.3rem;
    }
    button {
      all: unset;
      cursor: pointer;
      font-size: 0.88rem;
      color: var(--rb-accent-ink);
      text-decoration: underline;
      padding: 0.1rem 0.4rem;
    }
    button:focus-visible {
      outline: 2px solid var(--rb-accent);
    }
    .problem {
      color: var(--rb-fail);
      font-size: 0.8rem;
    }
  `;

  private readonly books = new BookController(this);
  @state() private problem: string | undefined;
  @state() private busy = false;

  override render() {
    return html`<button type="button" ?disabled=${this.busy} @click=${() => void this.add()}>+ New notebook page</button>
      ${this.problem ? html`<div class="problem" role="alert">${this.problem}</div>` : ''}`;
  }

  private async add(): Promise<void> {
    const service = this.books.service;
    if (!service || this.busy) return;
    this.busy = true;
    const pages = service.book.pages;
    const taken = new Set(pages.map((p) => p.title));
    let n = pages.length + 1;
    while (taken.has(`Notes ${n}`)) n++;
    const page: NotebookPage = {
      id: newId('page'),
      rev: 0,
      title: `Notes ${n}`,
      position: pages.reduce((m, p) => Math.max(m, p.position), 0) + 1,
      sections: [{ heading: 'Calculation', text: '', grid: [['', ''], ['', '']] }],
    };
    const r = await service.save({ put: { pages: [page] } });
    this.busy = false;
    if (!r.ok) {
      this.problem = r.message;
      return;
    }
    this.problem = undefined;
    location.hash = notebookRoute(page.id);
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-user-page-new': RbUserPageNew;
  }
}
