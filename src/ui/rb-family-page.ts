// Family page: one row per variant with its parameters as columns, and a form to add or edit a variant and its
// parameters (engineering values parsed with their units, messages beside each field).
import { LitElement, css, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, Variant } from '../domain/book.ts';
import { newId } from '../domain/book.ts';
import { VARIANT_PARAMS } from '../domain/params.ts';
import { formatValue } from '../domain/units.ts';
import { BookController } from './book-context.ts';
import { field, focusFirstProblem, group } from './form-fields.ts';
import type { FieldProblems, VariantDraft } from './record-forms.ts';
import { paramInfo, paramNames, validateVariant, variantDraft, variantUsers } from './record-forms.ts';
import { pageStyles } from './styles.ts';

type Editing = { variant: Variant | undefined; draft: VariantDraft; problems: FieldProblems; saveError?: string; conflict?: boolean };

function shown(name: string, v: Variant['params'][string] | undefined): string {
  if (v === undefined) return '';
  if (typeof v === 'string') return v;
  const { unit } = paramInfo(name, v);
  return unit === '' ? String(Number(v.toPrecision(4))) : formatValue(v, unit);
}

@customElement('rb-family-page')
export class RbFamilyPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      th small {
        display: block;
        font-weight: 400;
        color: var(--rb-na);
      }
      td.text {
        white-space: nowrap;
      }
      table.records tbody th {
        position: sticky;
        left: 0;
        background: var(--rb-sheet);
        border-bottom: 1px solid var(--rb-rule);
        font-size: 0.84rem;
        vertical-align: top;
      }
    `,
  ];

  private readonly books = new BookController(this);
  @state() private editing: Editing | undefined;
  @state() private confirmDelete: string | undefined;
  @state() private rowProblem: { id: string; message: string } | undefined;

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    return html`${this.editing ? this.renderForm(book, this.editing) : ''} ${this.renderList(book)}`;
  }

  private renderList(book: Book) {
    const variants = [...book.variants].sort((a, b) => a.code.localeCompare(b.code));
    const used = paramNames(book).filter((n) => variants.some((v) => v.params[n] !== undefined));
    return html`<section class="sheet" aria-labelledby="family-h">
      <h2 id="family-h">Variants</h2>
      <p class="why">
        ${variants.length} variants. Each column is a parameter the checks and build rules read by name; a blank cell
        means the variant does not set it.
      </p>
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => this.startEdit(book, undefined)}>Add a variant</button>
      </div>
      ${variants.length === 0
        ? html`<p class="empty">No variants yet. Add the first one above.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="family-table">
              <thead>
                <tr>
                  <th>code</th>
                  <th>name</th>
                  ${used.map((n) => {
                    const info = paramInfo(n, book.variants.find((v) => v.params[n] !== undefined)?.params[n]);
                    return html`<th class=${info.kind === 'number' ? 'num' : ''}>${n}${info.unit ? html`<small>${info.unit}</small>` : ''}</th>`;
                  })}
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${variants.map((v) => this.renderRow(book, v, used))}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private renderRow(book: Book, v: Variant, used: string[]) {
    const confirming = this.confirmDelete === v.id;
    const problem = this.rowProblem?.id === v.id ? this.rowProblem.message : undefined;
    return html`<tr class=${this.editing?.variant?.id === v.id ? 'editing' : ''} data-id=${v.id}>
      <th scope="row" class="code">${v.code}</th>
      <td class="text">${v.name}</td>
      ${used.map((n) => {
        const p = v.params[n];
        return html`<td class=${typeof p === 'string' ? 'text' : 'num'}>${shown(n, p)}</td>`;
      })}
      <td class="acts">
        ${confirming
          ? html`Delete ${v.code}?
              <button type="button" class="danger" @click=${() => this.delete(v)}>Delete</button>
              <button type="button" class="quiet" @click=${() => (this.confirmDelete = undefined)}>Keep</button>`
          : html`<button type="button" class="quiet" @click=${() => this.startEdit(book, v)}>edit</button>
              <button type="button" class="quiet" @click=${() => this.askDelete(book, v)}>delete</button>`}
        ${problem ? html`<div class="problem" role="alert">${problem}</div>` : ''}
      </td>
    </tr>`;
  }

  private renderForm(book: Book, e: Editing) {
    const d = e.draft;
    const set = (patch: Partial<VariantDraft>) => {
      if (this.editing) this.editing = { ...this.editing, draft: { ...this.editing.draft, ...patch } };
    };
    const setParam = (name: string, v: string) => set({ params: { ...d.params, [name]: v } });
    return html`<section class="sheet" aria-labelledby="variant-form-h">
      <h2 id="variant-form-h">${e.variant ? `Edit variant ${e.variant.code}` : 'New variant'}</h2>
      <p class="why">
        Values take engineering notation with or without the unit (230, 230 V, 470n, 0.47 uF, 4k7); fractions may be
        written as percentages (10 %). Leave a parameter blank to remove it.
      </p>
      ${e.saveError
        ? html`<p class="notice" role="alert">
            ${e.saveError}
            ${e.conflict ? html`<button type="button" @click=${this.restartFromStored}>Start again from the saved version</button>` : ''}
          </p>`
        : ''}
      <form class="record" novalidate @submit=${(ev: Event) => this.submit(ev, book)} aria-label="Variant">
        ${field({ name: 'code', label: 'code', value: d.code, problem: e.problems.code, hint: 'short code, unique in the Book', onInput: (v) => set({ code: v }) })}
        ${field({ name: 'name', label: 'name', value: d.name, problem: e.problems.name, onInput: (v) => set({ name: v }) })}
        ${field({ name: 'notes', label: 'notes', value: d.notes, multiline: true, onInput: (v) => set({ notes: v }) })}
        ${group('parameters')}
        ${Object.keys(d.params).map((n) => {
          const std = VARIANT_PARAMS.find((p) => p.name === n);
          const info = paramInfo(n, e.variant?.params[n]);
          const hint = std ? `${std.doc}${std.unit ? ` (${std.unit})` : ''}` : info.unit ? `(${info.unit})` : 'a parameter of this Book';
          return field({ name: `param:${n}`, label: n, value: d.params[n] ?? '', problem: e.problems[`param:${n}`], hint, onInput: (v) => setParam(n, v) });
        })}
        ${group('a parameter of your own')}
        ${field({
          name: 'newParamName',
          label: 'name',
          value: d.newParamName,
          problem: e.problems.newParamName,
          hint: 'for example r_gate; formulas read it by this name',
          onInput: (v) => set({ newParamName: v }),
        })}
        ${field({ name: 'newParamValue', label: 'value', value: d.newParamValue, problem: e.problems.newParamValue, onInput: (v) => set({ newParamValue: v }) })}
        <div class="actions">
          <button type="submit" class="primary">${e.variant ? 'Save the variant' : 'Add the variant'}</button>
          <button type="button" @click=${() => (this.editing = undefined)}>Cancel</button>
          ${Object.keys(e.problems).length
            ? html`<span class="problem" role="alert">Nothing saved: fix the marked fields.</span>`
            : ''}
        </div>
      </form>
    </section>`;
  }

  private startEdit(book: Book, variant: Variant | undefined): void {
    this.confirmDelete = undefined;
    this.rowProblem = undefined;
    this.editing = { variant, draft: variantDraft(book, variant), problems: {} };
    void this.updateComplete.then(() => this.renderRoot.querySelector<HTMLInputElement>('#f-code')?.focus());
  }

  private async submit(ev: Event, book: Book): Promise<void> {
    ev.preventDefault();
    const e = this.editing;
    const service = this.books.service;
    if (!e || !service) return;
    if (e.variant && !book.variants.some((v) => v.id === e.variant!.id)) {
      this.editing = { ...e, saveError: 'This variant was deleted elsewhere; nothing was saved.' };
      return;
    }
    const r = validateVariant(e.draft, book, e.variant, () => newId('var'));
    if (!r.ok) {
      this.editing = { ...e, problems: r.problems };
      await focusFirstProblem(this);
      return;
    }
    this.editing = { ...e, problems: {} };
    const result = await service.save({ put: { variants: [r.record] } });
    if (result.ok) this.editing = undefined;
    else this.editing = { ...e, problems: {}, saveError: result.message, conflict: result.conflict };
  }

  /** After a refused save: re-read the Book and reopen the form on the stored version of the record. */
  private readonly restartFromStored = async (): Promise<void> => {
    const service = this.books.service;
    const id = this.editing?.variant?.id;
    if (!service || !id) return;
    await service.reload();
    const cur = service.book.variants.find((r) => r.id === id);
    if (cur) this.startEdit(service.book, cur);
    else this.editing = undefined;
  };

  private askDelete(book: Book, v: Variant): void {
    const users = variantUsers(book, v.id);
    if (users) {
      this.rowProblem = { id: v.id, message: users };
      return;
    }
    this.rowProblem = undefined;
    this.confirmDelete = v.id;
  }

  private async delete(v: Variant): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    this.confirmDelete = undefined;
    const users = variantUsers(service.book, v.id);
    if (users) {
      this.rowProblem = { id: v.id, message: users };
      return;
    }
    const result = await service.save({ delete: { variants: [v.id] } });
    if (!result.ok) this.rowProblem = { id: v.id, message: result.message };
    if (this.editing?.variant?.id === v.id) this.editing = undefined;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-family-page': RbFamilyPage;
  }
}
