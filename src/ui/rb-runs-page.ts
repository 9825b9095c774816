// Runs page: the Book's production runs with a form to add or edit one (variant, quantity, date wanted, notes) and a
// delete that asks first; the chosen run's costing, freezing, purchase list and run sheet are in rb-run-detail.
import { LitElement, css, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, Run } from '../domain/book.ts';
import { newId } from '../domain/book.ts';
import { runDraft, validateRun } from '../domain/freeze.ts';
import type { RunDraft, RunProblems } from '../domain/freeze.ts';
import { BookController } from './book-context.ts';
import { deleteFromRow, field, nothingSaved, rowActions, saveRecordForm, saveRefusal } from './form-fields.ts';
import './rb-run-detail.ts';
import { runUsers } from './record-forms.ts';
import { sortRuns } from './run-order.ts';
import { pageStyles } from './styles.ts';

type Editing = { run: Run | undefined; draft: RunDraft; problems: RunProblems; saveError?: string; conflict?: boolean };

@customElement('rb-runs-page')
export class RbRunsPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      tr.chosen td {
        background: var(--rb-highlight);
      }
      td.state {
        white-space: nowrap;
        font-size: 0.85rem;
      }
      td.notes {
        max-width: 22rem;
        color: var(--rb-na);
        font-size: 0.85rem;
      }
    `,
  ];

  private readonly books = new BookController(this);
  @state() private editing: Editing | undefined;
  @state() private chosen: string | undefined;
  @state() private confirmDelete: string | undefined;
  @state() private rowProblem: { id: string; message: string } | undefined;

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    // Without a choice, the run wanted soonest (the first row of the list).
    const chosen = book.runs.find((r) => r.id === this.chosen) ?? sortRuns(book.runs)[0];
    // The run shown here is the one being worked on: the Export page starts on it.
    if (this.books.service) this.books.service.openedRunId = chosen?.id;
    return html`${this.editing ? this.renderForm(book, this.editing) : ''} ${this.renderList(book, chosen)}
    ${chosen ? html`<rb-run-detail .runId=${chosen.id}></rb-run-detail>` : ''}`;
  }

  private renderList(book: Book, chosen: Run | undefined) {
    const codes = new Map(book.variants.map((v) => [v.id, v.code] as const));
    const runs = sortRuns(book.runs);
    return html`<section class="sheet" aria-labelledby="runs-h">
      <h2 id="runs-h">Production runs</h2>
      <p class="why">
        A run is one variant built in one quantity by a date. Choose a run to see its costed BOM, freeze its prices,
        list what to order from whom, and print its run sheet.
      </p>
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => this.startEdit(book, undefined)}>Add a run</button>
      </div>
      ${runs.length === 0
        ? html`<p class="empty">No runs yet. Add the first one above.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="runs-table">
              <thead>
                <tr>
                  <th>name</th>
                  <th>variant</th>
                  <th class="num">quantity</th>
                  <th>date wanted</th>
                  <th>costing</th>
                  <th>notes</th>
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${runs.map((r) => this.renderRow(book, r, codes.get(r.variantId), r.id === chosen?.id))}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private renderRow(book: Book, r: Run, code: string | undefined, isChosen: boolean) {
    const confirming = this.confirmDelete === r.id;
    const problem = this.rowProblem?.id === r.id ? this.rowProblem.message : undefined;
    return html`<tr class=${isChosen ? 'chosen' : ''} data-id=${r.id}>
      <td>
        <button type="button" class="quiet" aria-pressed=${isChosen ? 'true' : 'false'} @click=${() => (this.chosen = r.id)}>${r.name}</button>
      </td>
      <td class="code">${code ?? html`<span class="problem">variant missing</span>`}</td>
      <td class="num">${r.quantity}</td>
      <td class="code">${r.dateWanted}</td>
      <td class="state">${r.frozen ? html`❄ frozen ${r.frozen.at.slice(0, 10)}` : html`↻ live`}</td>
      <td class="notes">${r.notes}</td>
      <td class="acts">
        ${rowActions({
          confirming,
          question: `Delete ${r.name}?`,
          onDelete: () => this.delete(r),
          onKeep: () => (this.confirmDelete = undefined),
          onEdit: () => this.startEdit(book, r),
          onAskDelete: () => this.askDelete(r),
          problem,
        })}
      </td>
    </tr>`;
  }

  private renderForm(book: Book, e: Editing) {
    const d = e.draft;
    const set = (patch: Partial<RunDraft>) => {
      if (this.editing) this.editing = { ...this.editing, draft: { ...this.editing.draft, ...patch } };
    };
    const codes = book.variants.map((v) => v.code);
    const code = book.variants.find((v) => v.id === d.variantId)?.code ?? '';
    return html`<section class="sheet" aria-labelledby="run-form-h">
      <h2 id="run-form-h">${e.run ? `Edit run ${e.run.name}` : 'New run'}</h2>
      <p class="why">
        ${e.run?.frozen
          ? 'This run is frozen: its variant and quantity stay as costed until you unfreeze it.'
          : 'The run is costed from the Book’s quotes as soon as it is saved.'}
      </p>
      ${saveRefusal(e.saveError, e.conflict, this.restartFromStored)}
      <form class="record" novalidate @submit=${(ev: Event) => this.submit(ev, book)} aria-label="Run">
        ${field({ name: 'name', label: 'name', value: d.name, problem: e.problems.name, hint: 'for example “Spring 2027 FR4”', onInput: (v) => set({ name: v }) })}
        ${field({
          name: 'variantId',
          label: 'variant',
          value: code,
          problem: e.problems.variantId,
          choices: codes,
          hint: 'the variant to build',
          onInput: (v) => set({ variantId: book.variants.find((x) => x.code === v)?.id ?? '' }),
        })}
        ${field({ name: 'quantity', label: 'quantity', value: d.quantity, problem: e.problems.quantity, hint: 'finished units, a whole number', onInput: (v) => set({ quantity: v }) })}
        ${field({ name: 'dateWanted', label: 'date wanted', value: d.dateWanted, problem: e.problems.dateWanted, placeholder: 'YYYY-MM-DD', hint: 'when the finished units are wanted', onInput: (v) => set({ dateWanted: v }) })}
        ${field({ name: 'notes', label: 'notes', value: d.notes, problem: e.problems.notes, multiline: true, onInput: (v) => set({ notes: v }) })}
        <div class="actions">
          <button type="submit" class="primary">${e.run ? 'Save the run' : 'Add the run'}</button>
          <button type="button" @click=${() => (this.editing = undefined)}>Cancel</button>
          ${nothingSaved(e.problems)}
        </div>
      </form>
    </section>`;
  }

  private startEdit(book: Book, run: Run | undefined): void {
    this.confirmDelete = undefined;
    this.rowProblem = undefined;
    const draft = runDraft(run);
    if (!run && book.variants.length === 1) draft.variantId = book.variants[0]!.id;
    this.editing = { run, draft, problems: {} };
    void this.updateComplete.then(() => this.renderRoot.querySelector<HTMLInputElement>('#f-name')?.focus());
  }

  private async submit(ev: Event, book: Book): Promise<void> {
    ev.preventDefault();
    const e = this.editing;
    const service = this.books.service;
    if (!e || !service) return;
    const saved = await saveRecordForm(this, service, e, {
      goneNoun: e.run && !book.runs.some((r) => r.id === e.run!.id) ? 'run' : undefined,
      validate: () => validateRun(e.draft, book, e.run, () => newId('run')),
      change: (record) => ({ put: { runs: [record] } }),
      set: (next) => (this.editing = next),
    });
    if (saved) this.chosen = saved.id;
  }

  private readonly restartFromStored = async (): Promise<void> => {
    const service = this.books.service;
    const id = this.editing?.run?.id;
    if (!service || !id) return;
    await service.reload();
    const cur = service.book.runs.find((r) => r.id === id);
    if (cur) this.startEdit(service.book, cur);
    else this.editing = undefined;
  };

  private askDelete(r: Run): void {
    const users = this.books.book ? runUsers(this.books.book, r.id) : undefined;
    if (users) {
      this.rowProblem = { id: r.id, message: users };
      return;
    }
    this.rowProblem = undefined;
    this.confirmDelete = r.id;
  }

  private async delete(r: Run): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    this.confirmDelete = undefined;
    const problem = await deleteFromRow(service, { delete: { runs: [r.id] } }, (b) => runUsers(b, r.id));
    if (problem) {
      this.rowProblem = { id: r.id, message: problem };
      return;
    }
    if (this.editing?.run?.id === r.id) this.editing = undefined;
    if (this.chosen === r.id) this.chosen = undefined;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-runs-page': RbRunsPage;
  }
}
