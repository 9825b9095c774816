// Template helpers for record forms: a labelled input with its hint and its problem message beside it, and the
// pieces every record form and record table shares (save refusals, the summary of problems, delete asked in place).
import { html, nothing } from 'lit';
import type { TemplateResult } from 'lit';
import { live } from 'lit/directives/live.js';
import type { NameHint } from './rb-formula-input.ts';
import type { Book } from '../domain/book.ts';
import type { BookChange } from '../domain/book-ops.ts';
import type { SaveResult } from './book-service.ts';

export interface FieldOptions {
  /** Field key; also the input's name and the key of its problem message. */
  name: string;
  label: string;
  value: string;
  problem?: string | undefined;
  hint?: string;
  placeholder?: string;
  onInput: (value: string) => void;
  /** A list of choices makes a select. */
  choices?: readonly string[];
  multiline?: boolean;
  size?: 'short' | 'long';
  /** A pre-filled value that is usually replaced: focusing the input selects it, so typing replaces it. */
  selectOnFocus?: boolean;
}

/** Selects the whole text when the input takes focus; the click that focused it does not undo the selection. */
const selectOnFocus = {
  focus(ev: FocusEvent): void {
    const input = ev.target as HTMLInputElement;
    input.select();
    input.dataset['selectedOnFocus'] = '1';
  },
  mouseup(ev: MouseEvent): void {
    const input = ev.target as HTMLInputElement;
    if (input.dataset['selectedOnFocus'] !== '1') return;
    delete input.dataset['selectedOnFocus'];
    ev.preventDefault();
  },
};

/** Ids for inputs inside one form's shadow root: the field name made safe for an id. */
export function fieldId(name: string): string {
  return `f-${name.replace(/[^A-Za-z0-9_-]/g, '_')}`;
}

export function field(o: FieldOptions): TemplateResult {
  const id = fieldId(o.name);
  const described = o.problem ? `${id}-problem` : o.hint ? `${id}-hint` : undefined;
  const onInput = (ev: Event) => o.onInput((ev.target as HTMLInputElement).value);
  const control = o.choices
    ? html`<select
        id=${id}
        name=${o.name}
        .value=${live(o.value)}
        aria-invalid=${o.problem ? 'true' : 'false'}
        aria-describedby=${described ?? nothing}
        @change=${onInput}
      >
        <option value="" ?selected=${o.value === ''}>—</option>
        ${o.choices.map((c) => html`<option value=${c} ?selected=${c === o.value}>${c}</option>`)}
      </select>`
    : o.multiline
      ? html`<textarea
          id=${id}
          name=${o.name}
          rows="2"
          .value=${live(o.value)}
          aria-invalid=${o.problem ? 'true' : 'false'}
          aria-describedby=${described ?? nothing}
          @input=${onInput}
        ></textarea>`
      : html`<input
          id=${id}
          name=${o.name}
          type="text"
          autocomplete="off"
          spellcheck="false"
          placeholder=${o.placeholder ?? nothing}
          .value=${live(o.value)}
          aria-invalid=${o.problem ? 'true' : 'false'}
          aria-describedby=${described ?? nothing}
          @input=${onInput}
          @focus=${o.selectOnFocus ? selectOnFocus.focus : nothing}
          @mouseup=${o.selectOnFocus ? selectOnFocus.mouseup : nothing}
        />`;
  return html`<label for=${id}>${o.label}</label>
    ${control}
    ${o.problem
      ? html`<span class="problem" id="${id}-problem" data-problem-for=${o.name}>${o.problem}</span>`
      : html`<span class="hint" id="${id}-hint">${o.hint ?? ''}</span>`}`;
}

export interface FormulaFieldOptions {
  /** Field key; also the key of its problem message. */
  name: string;
  label: string;
  value: string;
  /** Names offered while typing. */
  names: readonly NameHint[];
  problem?: string | undefined;
  hint: string;
  placeholder: string;
  onInput: (value: string) => void;
}

/** A labelled formula input (rb-formula-input, which the form's page loads) with its hint or problem beside it. */
export function formulaField(o: FormulaFieldOptions): TemplateResult {
  const id = fieldId(o.name);
  return html`<label for=${id}>${o.label}</label>
    <rb-formula-input
      id=${id}
      data-field=${o.name}
      .label=${o.label}
      .value=${o.value}
      .names=${o.names}
      .placeholder=${o.placeholder}
      ?invalid=${Boolean(o.problem)}
      @formula-input=${(ev: CustomEvent<{ value: string }>) => o.onInput(ev.detail.value)}
    ></rb-formula-input>
    ${o.problem
      ? html`<span class="problem" data-problem-for=${o.name} role="alert">${o.problem}</span>`
      : html`<span class="hint">${o.hint}</span>`}`;
}

export function group(title: string): TemplateResult {
  return html`<div class="group">${title}</div>`;
}

/** After a refused submit: move focus (and the view) to the first field with a problem. */
export async function focusFirstProblem(host: { updateComplete: Promise<boolean>; renderRoot: HTMLElement | DocumentFragment }): Promise<void> {
  await host.updateComplete;
  host.renderRoot.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
}

/** What every record form keeps while open: the problems beside its fields and, after a refused save, why. */
export interface RecordFormState {
  problems: Record<string, string>;
  saveError?: string;
  conflict?: boolean;
}

/**
 * The Save of a record form, alike on every record page: a record deleted elsewhere meanwhile is not saved again;
 * problems are shown beside their fields with the first one focused; a save the Book refuses keeps the form open
 * with why. `set` takes each state of the form (undefined: saved, close it). Gives the record saved, if it was.
 */
export async function saveRecordForm<S extends RecordFormState, R>(
  host: { updateComplete: Promise<boolean>; renderRoot: HTMLElement | DocumentFragment },
  service: { save(change: BookChange): Promise<SaveResult> },
  state: S,
  o: {
    /** What the record is called ("part"), when it was deleted elsewhere since the form opened. */
    goneNoun: string | undefined;
    validate: () => { ok: true; record: R } | { ok: false; problems: Record<string, string> };
    change: (record: R) => BookChange;
    set: (next: S | undefined) => void;
  },
): Promise<R | undefined> {
  if (o.goneNoun) {
    o.set({ ...state, saveError: `This ${o.goneNoun} was deleted elsewhere; nothing was saved.` });
    return undefined;
  }
  const r = o.validate();
  if (!r.ok) {
    o.set({ ...state, problems: r.problems });
    await focusFirstProblem(host);
    return undefined;
  }
  o.set({ ...state, problems: {} });
  const result = await service.save(o.change(r.record));
  if (!result.ok) {
    o.set({ ...state, problems: {}, saveError: result.message, conflict: result.conflict });
    return undefined;
  }
  o.set(undefined);
  return r.record;
}

/** Beside a form's buttons while any field has a problem: the one summary every record form gives. */
export function nothingSaved(problems: object): TemplateResult | '' {
  return Object.keys(problems).length ? html`<span class="problem" role="alert">Nothing saved: fix the marked fields.</span>` : '';
}

/** A save the Book service refused, above the form; a conflict (the record changed elsewhere) offers to start again. */
export function saveRefusal(saveError: string | undefined, conflict: boolean | undefined, onRestart: () => void): TemplateResult | '' {
  return saveError
    ? html`<p class="notice" role="alert">
        ${saveError}
        ${conflict ? html`<button type="button" @click=${onRestart}>Start again from the saved version</button>` : ''}
      </p>`
    : '';
}

export interface RowActions {
  /** Whether this row's delete is being asked about. */
  confirming: boolean;
  /** The question asked, such as `Delete R12?`. */
  question: string;
  onDelete: () => void;
  onKeep: () => void;
  onEdit: () => void;
  onAskDelete: () => void;
  /** Why this row's delete was refused (records still use it, or the Book refused the save), said under its buttons. */
  problem?: string | undefined;
}

/** A record row's edit and delete buttons; a delete is asked in place, with Delete and Keep. */
export function rowActions(o: RowActions): TemplateResult {
  const buttons = o.confirming
    ? html`${o.question}
        <button type="button" class="danger" @click=${o.onDelete}>Delete</button>
        <button type="button" class="quiet" @click=${o.onKeep}>Keep</button>`
    : html`<button type="button" class="quiet" @click=${o.onEdit}>edit</button>
        <button type="button" class="quiet" @click=${o.onAskDelete}>delete</button>`;
  return html`${buttons}${o.problem ? html`<div class="problem" role="alert">${o.problem}</div>` : nothing}`;
}

/**
 * A delete confirmed on a record's row: refused while records still use the record (`users`, asked of the Book as it
 * is at the click, which may have changed since the question was asked), else saved. Gives why it was not deleted —
 * those users, or the Book's refusal of the save — for the row to say, or undefined once deleted.
 */
export async function deleteFromRow(
  service: { book: Book; save(change: BookChange): Promise<SaveResult> },
  change: BookChange,
  users?: (book: Book) => string | undefined,
): Promise<string | undefined> {
  const used = users?.(service.book);
  if (used) return used;
  const result = await service.save(change);
  return result.ok ? undefined : result.message;
}
