// Parts page: every component in the Book, with a form to add or edit one (messages beside each field) and a delete
// that is refused while quotes or build lines still use the part.
import { LitElement, css, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, Part } from '../domain/book.ts';
import { PART_KINDS, newId } from '../domain/book.ts';
import { PART_RATINGS } from '../domain/params.ts';
import { formatValue } from '../domain/units.ts';
import { BookController } from './book-context.ts';
import { deleteFromRow, field, group, nothingSaved, rowActions, saveRecordForm, saveRefusal } from './form-fields.ts';
import type { FieldProblems, PartDraft } from './record-forms.ts';
import { KIND_VALUE_UNITS, partDraft, partUsers, validatePart } from './record-forms.ts';
import { pageStyles } from './styles.ts';

type Editing = { part: Part | undefined; draft: PartDraft; problems: FieldProblems; saveError?: string; conflict?: boolean };

function ratingsText(part: Part): string {
  return Object.entries(part.ratings)
    .map(([name, v]) => {
      const unit = PART_RATINGS.find((r) => r.name === name)?.unit ?? '';
      return `${name} ${unit === '' ? String(v) : formatValue(v, unit)}`;
    })
    .join(' · ');
}

@customElement('rb-parts-page')
export class RbPartsPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      td.desc {
        min-width: 16rem;
      }
      td.nowrap {
        white-space: nowrap;
      }
      td.ratings {
        font-family: var(--rb-mono);
        font-size: 0.78rem;
        min-width: 14rem;
      }
    `,
  ];

  private readonly books = new BookController(this);
  @state() private editing: Editing | undefined;
  @state() private confirmDelete: string | undefined;
  @state() private rowProblem: { id: string; message: string } | undefined;
  @state() private filter = '';

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    return html`${this.editing ? this.renderForm(book, this.editing) : ''} ${this.renderList(book)}`;
  }

  private renderList(book: Book) {
    const f = this.filter.trim().toLowerCase();
    const parts = [...book.parts]
      .filter((p) => !f || `${p.mpn} ${p.maker} ${p.description} ${p.kind} ${p.package}`.toLowerCase().includes(f))
      .sort((a, b) => a.kind.localeCompare(b.kind) || a.mpn.localeCompare(b.mpn));
    return html`<section class="sheet" aria-labelledby="parts-h">
      <h2 id="parts-h">Parts in this Book</h2>
      <p class="why">
        ${book.parts.length} parts, grouped by kind. Values and ratings are SI figures shown in engineering notation;
        checks read a part's ratings through the role its build line gives it.
      </p>
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => this.startEdit(undefined)}>Add a part</button>
        <input
          type="search"
          placeholder="Filter by part number, maker, kind…"
          aria-label="Filter parts"
          .value=${this.filter}
          @input=${(e: Event) => (this.filter = (e.target as HTMLInputElement).value)}
        />
        ${f ? html`<span class="muted">${parts.length} shown</span>` : ''}
      </div>
      ${parts.length === 0
        ? html`<p class="empty">${book.parts.length === 0 ? 'No parts yet. Add the first one above.' : 'No part matches the filter.'}</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="parts-table">
              <thead>
                <tr>
                  <th>mpn</th>
                  <th>kind</th>
                  <th class="num">value</th>
                  <th>description</th>
                  <th>maker</th>
                  <th>package</th>
                  <th>ratings</th>
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${parts.map((p) => this.renderRow(book, p))}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private renderRow(book: Book, p: Part) {
    const confirming = this.confirmDelete === p.id;
    const problem = this.rowProblem?.id === p.id ? this.rowProblem.message : undefined;
    return html`<tr class=${this.editing?.part?.id === p.id ? 'editing' : ''} data-id=${p.id}>
      <td class="code">${p.mpn}</td>
      <td>${p.kind}</td>
      <td class="num">${p.value === undefined ? '' : formatValue(p.value, p.unit ?? '')}</td>
      <td class="desc">${p.description}</td>
      <td class="nowrap">${p.maker}</td>
      <td class="nowrap">${p.package}</td>
      <td class="ratings">${ratingsText(p)}</td>
      <td class="acts">
        ${rowActions({
          confirming,
          question: `Delete ${p.mpn}?`,
          onDelete: () => this.delete(p),
          onKeep: () => (this.confirmDelete = undefined),
          onEdit: () => this.startEdit(p),
          onAskDelete: () => this.askDelete(book, p),
          problem,
        })}
      </td>
    </tr>`;
  }

  private renderForm(book: Book, e: Editing) {
    const d = e.draft;
    const set = (patch: Partial<PartDraft>) => {
      if (this.editing) this.editing = { ...this.editing, draft: { ...this.editing.draft, ...patch } };
    };
    const setRating = (name: string, v: string) => set({ ratings: { ...d.ratings, [name]: v } });
    const unit = KIND_VALUE_UNITS[d.kind as keyof typeof KIND_VALUE_UNITS];
    return html`<section class="sheet" aria-labelledby="part-form-h">
      <h2 id="part-form-h">${e.part ? `Edit part ${e.part.mpn}` : 'New part'}</h2>
      <p class="why">Values take engineering notation or RKM codes: 4.7 kΩ, 4k7, 330 nF, 0.47 uF, 600 V.</p>
      ${saveRefusal(e.saveError, e.conflict, this.restartFromStored)}
      <form class="record" novalidate @submit=${(ev: Event) => this.submit(ev, book)} aria-label="Part">
        ${field({ name: 'mpn', label: 'mpn', value: d.mpn, problem: e.problems.mpn, hint: 'maker part number, unique in the Book', onInput: (v) => set({ mpn: v }) })}
        ${field({ name: 'maker', label: 'maker', value: d.maker, problem: e.problems.maker, onInput: (v) => set({ maker: v }) })}
        ${field({ name: 'description', label: 'description', value: d.description, problem: e.problems.description, onInput: (v) => set({ description: v }) })}
        ${field({ name: 'kind', label: 'kind', value: d.kind, problem: e.problems.kind, choices: PART_KINDS, onInput: (v) => set({ kind: v }) })}
        ${field({
          name: 'value',
          label: 'value',
          value: d.value,
          problem: e.problems.value,
          hint: unit ? `principal value, in ${unit} unless you write another unit` : 'principal value with its unit, if the part has one',
          onInput: (v) => set({ value: v }),
        })}
        ${field({ name: 'package', label: 'package', value: d.package, problem: e.problems.package, onInput: (v) => set({ package: v }) })}
        ${field({ name: 'placements', label: 'placements', value: d.placements, problem: e.problems.placements, hint: 'placements per piece, for labour (blank = 1)', onInput: (v) => set({ placements: v }) })}
        ${group('ratings')}
        ${PART_RATINGS.map((r) =>
          field({
            name: `rating:${r.name}`,
            label: r.name,
            value: d.ratings[r.name] ?? '',
            problem: e.problems[`rating:${r.name}`],
            hint: `${r.doc}${r.unit ? ` (${r.unit})` : ''}`,
            onInput: (v) => setRating(r.name, v),
          }),
        )}
        ${group('notes')}
        ${field({ name: 'notes', label: 'notes', value: d.notes, multiline: true, onInput: (v) => set({ notes: v }) })}
        <div class="actions">
          <button type="submit" class="primary">${e.part ? 'Save the part' : 'Add the part'}</button>
          <button type="button" @click=${() => (this.editing = undefined)}>Cancel</button>
          ${nothingSaved(e.problems)}
        </div>
      </form>
    </section>`;
  }

  private startEdit(part: Part | undefined): void {
    this.confirmDelete = undefined;
    this.rowProblem = undefined;
    this.editing = { part, draft: partDraft(part), problems: {} };
    void this.updateComplete.then(() => this.renderRoot.querySelector<HTMLInputElement>('#f-mpn')?.focus());
  }

  private async submit(ev: Event, book: Book): Promise<void> {
    ev.preventDefault();
    const e = this.editing;
    const service = this.books.service;
    if (!e || !service) return;
    await saveRecordForm(this, service, e, {
      goneNoun: e.part && !book.parts.some((p) => p.id === e.part!.id) ? 'part' : undefined,
      validate: () => validatePart(e.draft, book, e.part, () => newId('part')),
      change: (record) => ({ put: { parts: [record] } }),
      set: (next) => (this.editing = next),
    });
  }

  /** After a refused save: re-read the Book and reopen the form on the stored version of the record. */
  private readonly restartFromStored = async (): Promise<void> => {
    const service = this.books.service;
    const id = this.editing?.part?.id;
    if (!service || !id) return;
    await service.reload();
    const cur = service.book.parts.find((r) => r.id === id);
    if (cur) this.startEdit(cur);
    else this.editing = undefined;
  };

  private askDelete(book: Book, p: Part): void {
    const users = partUsers(book, p.id);
    if (users) {
      this.rowProblem = { id: p.id, message: users };
      return;
    }
    this.rowProblem = undefined;
    this.confirmDelete = p.id;
  }

  private async delete(p: Part): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    this.confirmDelete = undefined;
    const problem = await deleteFromRow(service, { delete: { parts: [p.id] } }, (b) => partUsers(b, p.id));
    if (problem) this.rowProblem = { id: p.id, message: problem };
    else if (this.editing?.part?.id === p.id) this.editing = undefined;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-parts-page': RbPartsPage;
  }
}
