// The form to add or edit a check: name, title, group, formula, unit, rule (kind, limits, margin), applies-when and
// note, with each problem beside its field and a preview of the check on every variant before it is saved.
import { LitElement, css, html } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import type { Book, Check, CheckRule, CheckRuleKind } from '../domain/book.ts';
import { CHECK_RULE_KINDS, newId } from '../domain/book.ts';
import { STATUS_SYMBOL } from '../domain/check-status.ts';
import { PART_RATINGS } from '../domain/params.ts';
import { canonicalUnit, formatValue } from '../domain/units.ts';
import { evaluateChecks } from '../engine/family.ts';
import type { CheckResult } from '../engine/family.ts';
import { formulaBody, nameKey, tokenizeFormula } from '../engine/formula-names.ts';
import { guardFormula } from '../engine/formula-guard.ts';
import { BookController } from './book-context.ts';
import { field, formulaField, nothingSaved } from './form-fields.ts';
import { CheckSchema, LIMITS } from '../domain/schema.ts';
import type { FieldProblems } from './record-forms.ts';
import { limitLength, schemaFormResult } from './record-forms.ts';
import { checkFormulaNames } from './rb-formula-input.ts';
import type { NameHint } from './rb-formula-input.ts';
import { pageStyles, previewStyles } from './styles.ts';
import './rb-formula-input.ts';

export interface CheckDraft {
  name: string;
  title: string;
  group: string;
  formula: string;
  unit: string;
  kind: CheckRuleKind;
  limit: string;
  low: string;
  high: string;
  /** Margin band in percent of the limit, as typed ("10" or "10 %"). */
  margin: string;
  applies: string;
  note: string;
}

export function checkDraft(check?: Check): CheckDraft {
  const r = check?.rule;
  return {
    name: check?.name ?? '',
    title: check?.title ?? '',
    group: check?.group ?? 'my checks',
    formula: check?.formula ?? '',
    unit: check?.unit ?? '',
    kind: r?.kind ?? 'max',
    limit: r?.limit ?? '',
    low: r?.low ?? '',
    high: r?.high ?? '',
    margin: r?.margin === undefined ? '' : String(Number((r.margin * 100).toPrecision(6))),
    applies: check?.appliesWhen ?? '',
    note: check?.note ?? '',
  };
}

function formulaProblem(text: string, what: string, required: boolean): string | undefined {
  const body = formulaBody(text);
  if (body === '') return required ? `${what} is required` : undefined;
  const t = tokenizeFormula(body);
  if (!t.ok) return t.error;
  // Too long, too deep or over a huge range: refused before it can reach the engine and freeze the page.
  const g = guardFormula(body);
  return g.ok ? undefined : g.refusal.message;
}

/** Checks a draft against the Book; gives the record (rev 0 for a new check) or messages keyed by field. */
export function validateCheckDraft(
  d: CheckDraft,
  book: Book,
  editing: Check | undefined,
  makeId: () => string = () => newId('check'),
): { ok: true; record: Check } | { ok: false; problems: FieldProblems } {
  const problems: FieldProblems = {};
  const name = d.name.trim();
  const key = nameKey(name);
  if (name === '') problems.name = 'name is required';
  else if (!/^[a-z_][a-z0-9_]*$/.test(name)) problems.name = 'small letters, digits and _ only, starting with a letter (formulas read the check by this name)';
  else if (book.checks.some((c) => c.id !== editing?.id && nameKey(c.name) === key)) problems.name = `another check is already called ${name}`;
  else if (book.variants.some((v) => Object.keys(v.params).some((p) => nameKey(p) === key))) problems.name = `${name} is a variant parameter; choose another name`;
  else if (PART_RATINGS.some((r) => key.endsWith(`_${r.name}`)) || key.endsWith('_value')) {
    const roles = new Set(book.buildLines.map((l) => (l.role ? nameKey(l.role) : '')));
    const clash = [...roles].some((role) => role !== '' && key.startsWith(`${role}_`));
    if (clash) problems.name = `${name} is a part rating name of a build-line role; choose another name`;
  }
  if (d.title.trim() === '') problems.title = 'title is required';
  limitLength(problems, 'name', name, LIMITS.name);
  limitLength(problems, 'title', d.title.trim(), LIMITS.shortText);
  limitLength(problems, 'group', d.group.trim(), LIMITS.name);
  limitLength(problems, 'unit', d.unit.trim(), LIMITS.name);
  limitLength(problems, 'note', d.note.trim(), LIMITS.notes);
  const fp = formulaProblem(d.formula, 'formula', true);
  if (fp) problems.formula = fp;
  const rule: CheckRule = { kind: d.kind };
  if (!(CHECK_RULE_KINDS as readonly string[]).includes(d.kind)) problems.kind = 'choose max, min, between or true';
  if (d.kind === 'max' || d.kind === 'min') {
    const p = formulaProblem(d.limit, 'the limit', true);
    if (p) problems.limit = p;
    else rule.limit = formulaBody(d.limit);
  } else if (d.kind === 'between') {
    const lo = formulaProblem(d.low, 'the low limit', true);
    const hi = formulaProblem(d.high, 'the high limit', true);
    if (lo) problems.low = lo;
    else rule.low = formulaBody(d.low);
    if (hi) problems.high = hi;
    else rule.high = formulaBody(d.high);
  }
  const m = d.margin.trim().replace(/\s*%$/, '');
  if (m !== '') {
    const n = Number(m);
    if (!Number.isFinite(n) || n < 0 || n >= 100) problems.margin = 'a percentage from 0 up to (not including) 100';
    else if (n > 0) rule.margin = n / 100;
  }
  const ap = formulaProblem(d.applies, 'applies-when', false);
  if (ap) problems.applies = ap;
  if (Object.keys(problems).length > 0) return { ok: false, problems };
  // The last check: the record as saved, through the schema the Book file reader uses, each problem by its field.
  const fieldOf = (path: string): string => {
    const [head = '', sub] = path.split(/[.[]/);
    if (head === 'rule') return sub === 'margin' || sub === 'low' || sub === 'high' || sub === 'limit' ? sub : 'kind';
    return head === 'appliesWhen' ? 'applies' : head;
  };
  const record: Check = {
    id: editing?.id ?? makeId(),
    rev: editing?.rev ?? 0,
    name,
    title: d.title.trim(),
    group: d.group.trim() || 'my checks',
    formula: formulaBody(d.formula),
    unit: canonicalUnit(d.unit),
    rule,
    appliesWhen: formulaBody(d.applies),
    note: d.note.trim(),
    builtIn: editing?.builtIn ?? false,
  };
  return schemaFormResult(CheckSchema, record, fieldOf);
}

/** Variants a preview evaluates: enough to show the check at work while typing, however large the family. */
export const PREVIEW_VARIANTS = 24;

/**
 * The check on the Book's first PREVIEW_VARIANTS variants, evaluated with the Book's other checks (so it may read
 * them by name). Each variant's row is independent of the others, so the sample's results equal the whole family's.
 */
export function previewCheck(book: Book, record: Check): CheckResult[] {
  const checks = [...book.checks.filter((c) => c.id !== record.id), record];
  const sample = { ...book, variants: book.variants.slice(0, PREVIEW_VARIANTS) };
  return evaluateChecks(sample, checks).filter((r) => r.checkId === record.id);
}

/**
 * Where an error that every variant shares belongs: a rule or applies-when problem beside that field, anything else
 * beside the formula. Undefined when at least one variant gets an answer.
 */
export function sharedProblem(results: readonly CheckResult[], kind: CheckRuleKind): FieldProblems | undefined {
  if (results.length === 0 || results.some((r) => r.status !== 'error')) return undefined;
  const message = results[0]!.message;
  if (message.startsWith('applies')) return { applies: message };
  const rule = /^rule (limit|low|high)/.exec(message);
  if (rule) return { [rule[1]!]: message };
  if (message.startsWith('rule:')) return { [kind === 'between' ? 'low' : 'limit']: message };
  return { formula: message };
}

export type CheckSavedDetail = { checkId: string };

@customElement('rb-check-form')
export class RbCheckForm extends LitElement {
  static override styles = [
    pageStyles,
    previewStyles,
    css`
      :host {
        display: block;
      }
      .preview .fail,
      .preview .error {
        color: var(--rb-fail);
        background: var(--rb-fail-bg);
      }
      .preview .margin {
        color: var(--rb-margin);
        background: var(--rb-margin-bg);
      }
      .preview .pass {
        color: var(--rb-pass);
      }
    `,
  ];

  /** The check being edited; undefined for a new one. */
  @property({ attribute: false }) check: Check | undefined;
  @state() private draft: CheckDraft = checkDraft();
  @state() private problems: FieldProblems = {};
  @state() private saveError = '';
  @state() private preview: CheckResult[] = [];
  private readonly books = new BookController(this);
  private timer: ReturnType<typeof setTimeout> | undefined;
  private names: readonly NameHint[] = [];
  private namesFor: Book | undefined;

  override willUpdate(changed: Map<PropertyKey, unknown>): void {
    if (changed.has('check')) {
      this.draft = checkDraft(this.check);
      this.problems = {};
      this.saveError = '';
      this.schedulePreview();
    }
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    clearTimeout(this.timer);
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    if (this.namesFor !== book) {
      this.names = checkFormulaNames(book);
      this.namesFor = book;
    }
    const d = this.draft;
    const p = this.problems;
    const set = (patch: Partial<CheckDraft>) => {
      this.draft = { ...this.draft, ...patch };
      this.schedulePreview();
    };
    const formula = (name: keyof CheckDraft, label: string, hint: string, placeholder = '') =>
      formulaField({ name, label, value: d[name], names: this.names, problem: p[name], hint, placeholder, onInput: (v) => set({ [name]: v }) });
    const c = this.check;
    return html`<form class="record" novalidate aria-label="Check" @submit=${(e: Event) => this.submit(e)}>
      ${this.saveError ? html`<p class="notice" role="alert" style="grid-column: 1 / -1">${this.saveError}</p>` : ''}
      ${field({ name: 'name', label: 'name', value: d.name, problem: p.name, hint: 'how formulas refer to it, e.g. zener_share', onInput: (v) => set({ name: v }) })}
      ${field({ name: 'title', label: 'title', value: d.title, problem: p.title, hint: 'one line saying what is checked', onInput: (v) => set({ title: v }) })}
      ${field({ name: 'group', label: 'group', value: d.group, hint: 'checks of a group are listed together', onInput: (v) => set({ group: v }) })}
      ${formula('formula', 'formula', 'the figure to judge, from parameters (load_w), part ratings (switch_v_max) and checks', 'MAINS_PEAK(mains_v, mains_tol)')}
      ${field({ name: 'unit', label: 'unit', value: d.unit, hint: 'V, A, W, Ω, F, s, Hz, °C, K/W, or blank', onInput: (v) => set({ unit: v }) })}
      ${field({
        name: 'kind',
        label: 'rule',
        value: d.kind,
        problem: p.kind,
        choices: CHECK_RULE_KINDS,
        hint: 'max: at most the limit · min: at least · between: low … high · true: a TRUE result passes',
        onInput: (v) => set({ kind: v as CheckRuleKind }),
      })}
      ${d.kind === 'max' || d.kind === 'min' ? formula('limit', 'limit', 'a number or a formula, e.g. switch_v_max * 0.8') : ''}
      ${d.kind === 'between' ? html`${formula('low', 'low limit', 'a number or a formula')}${formula('high', 'high limit', 'a number or a formula')}` : ''}
      ${d.kind !== 'true'
        ? field({ name: 'margin', label: 'margin %', value: d.margin, problem: p.margin, hint: 'within this share of the limit shows “margin” instead of “pass”', onInput: (v) => set({ margin: v }) })
        : ''}
      ${formula('applies', 'applies when', 'blank for every variant; e.g. supply="dropper" — elsewhere the check shows n/a')}
      ${field({ name: 'note', label: 'note', value: d.note, multiline: true, hint: 'why the rule holds and where it comes from', onInput: (v) => set({ note: v }) })}
      <span></span>
      <div class="preview" aria-label="Preview on the variants" data-testid="check-preview">
        ${this.preview.map(
          (r) => html`<span class=${r.status === 'n/a' ? 'na' : r.status} title=${r.message}
            >${r.variantCode} ${STATUS_SYMBOL[r.status]} ${r.status}${typeof r.value === 'number' ? ` · ${formatValue(r.value, r.unit)}` : ''}</span
          >`,
        )}
      </div>
      <span></span>
      <div class="actions">
        <button type="submit" class="primary">${c ? 'Save the check' : 'Add the check'}</button>
        <button type="button" @click=${() => this.dispatchEvent(new CustomEvent('check-cancel', { bubbles: true, composed: true }))}>Cancel</button>
        ${nothingSaved(p)}
      </div>
    </form>`;
  }

  private schedulePreview(): void {
    clearTimeout(this.timer);
    this.timer = setTimeout(() => this.runPreview(), 250);
  }

  /** Evaluates the draft on every variant; returns the problems that block saving (none when some variant answers). */
  private runPreview(): FieldProblems {
    const book = this.books.book;
    if (!book) return {};
    const v = validateCheckDraft(this.draft, book, this.check, () => 'check_draft');
    if (!v.ok) {
      this.preview = [];
      return v.problems;
    }
    this.preview = previewCheck(book, v.record);
    return sharedProblem(this.preview, this.draft.kind) ?? {};
  }

  private async submit(e: Event): Promise<void> {
    e.preventDefault();
    clearTimeout(this.timer);
    const service = this.books.service;
    const book = this.books.book;
    if (!service || !book) return;
    if (this.check && !book.checks.some((c) => c.id === this.check!.id)) {
      this.saveError = 'This check was deleted elsewhere; nothing was saved.';
      return;
    }
    const v = validateCheckDraft(this.draft, book, this.check);
    if (!v.ok) {
      this.problems = v.problems;
      return;
    }
    this.preview = previewCheck(book, v.record);
    const shared = sharedProblem(this.preview, this.draft.kind);
    if (shared) {
      this.problems = shared;
      return;
    }
    this.problems = {};
    const held = book.checks.find((c) => c.id === v.record.id);
    const record = held ? { ...v.record, rev: held.rev } : v.record;
    const result = await service.save({ put: { checks: [record] } });
    if (!result.ok) {
      this.saveError = result.message;
      return;
    }
    this.dispatchEvent(new CustomEvent<CheckSavedDetail>('check-saved', { detail: { checkId: record.id }, bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-check-form': RbCheckForm;
  }
}
