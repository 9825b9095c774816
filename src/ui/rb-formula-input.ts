// A formula text field with help while typing: inside a function's parentheses it shows that function's signature
// (the argument being typed in bold) and its one-line doc; on a half-typed word it offers the names that fit
// (variant parameters, role ratings, checks, functions), each with a line saying what it is.
import { LitElement, css, html, nothing } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property, query, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book } from '../domain/book.ts';
import { PART_RATINGS, VARIANT_PARAMS } from '../domain/params.ts';
import { FUNCTION_DOCS, functionDoc } from '../engine/functions/index.ts';
import type { FunctionDoc } from '../engine/functions/index.ts';
import { TOKEN_KIND, tokenizeFormula } from '../engine/formula-names.ts';

/** A name a formula may use, with the line shown beside it. */
export interface NameHint {
  name: string;
  doc: string;
  /** 'name' is inserted as written; 'function' gets "(" after it. */
  kind: 'name' | 'function';
}

export type FormulaInputDetail = { value: string };

/** Standard spreadsheet functions people reach for in checks; named so the help can say they exist. */
const STANDARD_FUNCTIONS = ['IF', 'AND', 'OR', 'NOT', 'MIN', 'MAX', 'ABS', 'SQRT', 'LN', 'LOG10', 'PI', 'ROUND', 'SUM', 'INDEX', 'MATCH'];

const FUNCTION_HINTS: readonly NameHint[] = [
  ...FUNCTION_DOCS.map((d) => ({ name: d.name, doc: d.doc, kind: 'function' as const })),
  ...STANDARD_FUNCTIONS.map((name) => ({ name, doc: 'standard spreadsheet function (OpenFormula)', kind: 'function' as const })),
];

/**
 * Names a check formula of this Book may use: every variant parameter, `<role>_<rating>` for each role its build
 * lines give, and the other checks by name.
 */
export function checkFormulaNames(book: Book): NameHint[] {
  const out = new Map<string, NameHint>();
  for (const p of VARIANT_PARAMS) out.set(p.name, { name: p.name, doc: `parameter: ${p.doc}${p.unit ? ` (${p.unit})` : ''}`, kind: 'name' });
  for (const v of book.variants) {
    for (const name of Object.keys(v.params)) if (!out.has(name)) out.set(name, { name, doc: 'parameter of this Book', kind: 'name' });
  }
  const roles = [...new Set(book.buildLines.map((l) => l.role ?? '').filter((r) => r !== ''))].sort();
  for (const role of roles) {
    out.set(`${role}_value`, { name: `${role}_value`, doc: `principal value of the ${role} part`, kind: 'name' });
    for (const r of PART_RATINGS) {
      out.set(`${role}_${r.name}`, { name: `${role}_${r.name}`, doc: `${role} part: ${r.doc}${r.unit ? ` (${r.unit})` : ''}`, kind: 'name' });
    }
  }
  for (const c of book.checks) out.set(c.name, { name: c.name, doc: `check: ${c.title}`, kind: 'name' });
  return [...out.values()];
}

/** The function call the caret stands in, and which argument, from the text before the caret. */
export function callAtCaret(before: string): { name: string; arg: number } | undefined {
  const t = tokenizeFormula(before);
  if (!t.ok) return undefined;
  const stack: { name: string; arg: number }[] = [];
  let pending: string | undefined;
  for (const tok of t.tokens) {
    if (tok.kind === TOKEN_KIND.func) {
      pending = tok.text;
      continue;
    }
    if (tok.kind === TOKEN_KIND.space) continue;
    if (tok.kind === TOKEN_KIND.op && tok.text === '(') {
      stack.push({ name: pending ?? '', arg: 0 });
    } else if (tok.kind === TOKEN_KIND.op && tok.text === ')') {
      stack.pop();
    } else if (tok.kind === TOKEN_KIND.op && (tok.text === ',' || tok.text === ';')) {
      const top = stack[stack.length - 1];
      if (top) top.arg += 1;
    }
    pending = undefined;
  }
  for (let i = stack.length - 1; i >= 0; i--) if (stack[i]!.name) return stack[i];
  return undefined;
}

/** The word being typed at the end of `before`, when the caret is not inside text in quotes. */
export function wordAtCaret(before: string): string {
  if (!tokenizeFormula(before).ok) return '';
  return /[A-Za-z_][A-Za-z0-9_]*$/.exec(before)?.[0] ?? '';
}

function signature(doc: FunctionDoc, current: number): TemplateResult {
  const args = doc.args.map((a, i) => {
    const text = `${a.name}${a.unit ? ` ${a.unit}` : ''}`;
    const shown = a.optional ? `[${text}]` : text;
    return i === current ? html`<b>${shown}</b>` : shown;
  });
  const joined: (TemplateResult | string)[] = [];
  args.forEach((a, i) => {
    if (i > 0) joined.push(', ');
    joined.push(a);
  });
  return html`<code>${doc.name}(${joined})${doc.returns ? ` → ${doc.returns}` : ''}</code>`;
}

@customElement('rb-formula-input')
export class RbFormulaInput extends LitElement {
  static override styles = css`
    :host {
      display: block;
      position: relative;
      min-width: 0;
    }
    input {
      box-sizing: border-box;
      width: 100%;
      font-family: var(--rb-mono);
      font-size: 0.86rem;
      padding: 0.2rem 0.35rem;
      border: 1px solid var(--rb-rule);
      border-bottom: 2px solid var(--rb-ink);
      background: var(--rb-paper);
      color: var(--rb-ink);
    }
    input[aria-invalid='true'] {
      border-bottom-color: var(--rb-fail);
      background: var(--rb-fail-bg);
    }
    input:focus-visible {
      outline: 2px solid var(--rb-accent);
      outline-offset: 1px;
    }
    .help {
      font-size: 0.8rem;
      color: var(--rb-na);
      margin-top: 0.15rem;
      line-height: 1.35;
    }
    .help code {
      font-family: var(--rb-mono);
      color: var(--rb-accent-ink);
    }
    .help b {
      color: var(--rb-ink);
      text-decoration: underline;
    }
    ul {
      list-style: none;
      margin: 0.15rem 0 0;
      padding: 0;
      border-left: 2px solid var(--rb-accent);
    }
    li button {
      all: unset;
      display: block;
      cursor: pointer;
      padding: 0.05rem 0.4rem;
      font-size: 0.8rem;
    }
    li button:hover,
    li button:focus-visible {
      background: var(--rb-highlight);
    }
    li code {
      font-family: var(--rb-mono);
      color: var(--rb-accent-ink);
      margin-right: 0.5rem;
    }
  `;

  @property() value = '';
  /** Accessible name of the field. */
  @property() label = 'formula';
  @property() placeholder = '';
  /** Names offered while typing, besides the functions. */
  @property({ attribute: false }) names: readonly NameHint[] = [];
  @property({ type: Boolean }) invalid = false;
  @state() private caret = -1;
  @query('input') private input!: HTMLInputElement;

  override render() {
    return html`<input
        type="text"
        autocomplete="off"
        spellcheck="false"
        aria-label=${this.label}
        aria-invalid=${this.invalid ? 'true' : 'false'}
        placeholder=${this.placeholder || nothing}
        .value=${live(this.value)}
        @input=${this._onInput}
        @keyup=${this._onCaret}
        @click=${this._onCaret}
        @focus=${this._onCaret}
        @blur=${this._onBlur}
        @keydown=${this._onKeydown}
      />${this.caret >= 0 ? this.renderHelp() : ''}`;
  }

  private renderHelp(): TemplateResult | string {
    const before = this.value.slice(0, this.caret);
    const word = wordAtCaret(before);
    if (word.length >= 1) {
      const key = word.toLowerCase();
      const matches = [...this.names, ...FUNCTION_HINTS]
        .filter((h) => h.name.toLowerCase().startsWith(key) && h.name.toLowerCase() !== key)
        .slice(0, 6);
      if (matches.length > 0) {
        return html`<ul class="help" role="listbox" aria-label="Names that fit">
          ${matches.map(
            (m) => html`<li>
              <button type="button" role="option" aria-selected="false" @mousedown=${(e: Event) => this.pick(e, word, m)}>
                <code>${m.name}${m.kind === 'function' ? '(' : ''}</code>${m.doc}
              </button>
            </li>`,
          )}
        </ul>`;
      }
    }
    const call = callAtCaret(before);
    const doc = call ? functionDoc(call.name) : undefined;
    if (call && doc) {
      return html`<div class="help" role="status" data-testid="formula-help">${signature(doc, call.arg)} — ${doc.doc}</div>`;
    }
    if (call && STANDARD_FUNCTIONS.includes(call.name.toUpperCase())) {
      return html`<div class="help" role="status" data-testid="formula-help"><code>${call.name.toUpperCase()}</code> — standard spreadsheet function (OpenFormula)</div>`;
    }
    return '';
  }

  /** Replaces the half-typed word with the chosen name. */
  private pick(e: Event, word: string, hint: NameHint): void {
    e.preventDefault();
    const before = this.value.slice(0, this.caret - word.length);
    const after = this.value.slice(this.caret);
    const insert = hint.kind === 'function' ? `${hint.name}(` : hint.name;
    this.setValue(before + insert + after);
    this.caret = before.length + insert.length;
    void this.updateComplete.then(() => {
      this.input.focus();
      this.input.setSelectionRange(this.caret, this.caret);
    });
  }

  private setValue(value: string): void {
    this.value = value;
    this.dispatchEvent(new CustomEvent<FormulaInputDetail>('formula-input', { detail: { value }, bubbles: true, composed: true }));
  }

  private readonly _onInput = (e: Event): void => {
    const el = e.target as HTMLInputElement;
    this.caret = el.selectionStart ?? el.value.length;
    this.setValue(el.value);
  };

  private readonly _onCaret = (e: Event): void => {
    const el = e.target as HTMLInputElement;
    this.caret = el.selectionStart ?? el.value.length;
  };

  private readonly _onBlur = (): void => {
    this.caret = -1;
    this.dispatchEvent(new CustomEvent<FormulaInputDetail>('formula-commit', { detail: { value: this.value }, bubbles: true, composed: true }));
  };

  private readonly _onKeydown = (e: KeyboardEvent): void => {
    if (e.key === 'Escape') this.caret = -1;
    if (e.key === 'Enter') {
      this.dispatchEvent(new CustomEvent<FormulaInputDetail>('formula-commit', { detail: { value: this.value }, bubbles: true, composed: true }));
    }
  };

  override focus(): void {
    this.input?.focus();
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-formula-input': RbFormulaInput;
  }
  interface HTMLElementEventMap {
    'formula-input': CustomEvent<FormulaInputDetail>;
    'formula-commit': CustomEvent<FormulaInputDetail>;
  }
}
