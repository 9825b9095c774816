// Shared styles for Rungbook pages: the notebook look (headed sections with a line of explanation, ruled tables
// with tabular numerals, forms whose messages sit beside the field). Elements add these to their own styles.
import { css, unsafeCSS } from 'lit';
import type { CSSResult } from 'lit';

export const pageStyles = css`
  :host {
    display: block;
    color: var(--rb-ink);
    font-family: var(--rb-font);
  }
  h1 {
    font-size: 1.7rem;
    font-weight: 600;
    margin: 0 0 0.2rem;
    letter-spacing: 0.01em;
  }
  .blurb {
    margin: 0 0 1.4rem;
    font-style: italic;
    color: var(--rb-na);
    max-width: 60rem;
  }
  section.sheet {
    margin: 0 0 2rem;
    padding: 0.9rem 1.1rem 1.1rem;
    background: var(--rb-sheet);
    border: 1px solid var(--rb-rule);
    border-left: 4px solid var(--rb-accent);
    border-radius: 2px 6px 6px 2px;
  }
  section.sheet > h2 {
    font-size: 1.05rem;
    font-variant: small-caps;
    letter-spacing: 0.06em;
    margin: 0;
    color: var(--rb-accent-ink);
  }
  section.sheet > p.why {
    margin: 0.15rem 0 0.8rem;
    font-size: 0.92rem;
    color: var(--rb-na);
  }
  .scroll {
    overflow-x: auto;
  }
  table.records {
    border-collapse: collapse;
    font-size: 0.9rem;
    font-variant-numeric: tabular-nums;
    min-width: 100%;
  }
  table.records th {
    font-family: var(--rb-mono);
    font-size: 0.78rem;
    font-weight: 600;
    text-align: left;
    color: var(--rb-accent-ink);
    border-bottom: 2px solid var(--rb-ink);
    padding: 0.35rem 0.6rem 0.25rem;
    white-space: nowrap;
    vertical-align: bottom;
  }
  table.records td {
    border-bottom: 1px solid var(--rb-rule);
    padding: 0.3rem 0.6rem;
    vertical-align: top;
  }
  table.records td.num,
  table.records th.num {
    text-align: right;
    white-space: nowrap;
  }
  table.records td.code {
    font-family: var(--rb-mono);
    font-size: 0.84rem;
    white-space: nowrap;
  }
  table.records tr.editing td {
    background: var(--rb-highlight);
  }
  table.records td.acts {
    white-space: nowrap;
    text-align: right;
  }
  .empty {
    font-style: italic;
    color: var(--rb-na);
  }
  button {
    font: inherit;
    font-size: 0.88rem;
    border: 1px solid var(--rb-accent);
    background: var(--rb-paper);
    color: var(--rb-accent-ink);
    padding: 0.2rem 0.7rem;
    border-radius: 999px;
    cursor: pointer;
  }
  button:hover {
    background: var(--rb-highlight);
  }
  button.primary {
    background: var(--rb-accent);
    color: var(--rb-paper);
  }
  button.primary:hover {
    background: var(--rb-accent-ink);
  }
  button.quiet {
    border-color: transparent;
    background: transparent;
    text-decoration: underline;
    padding: 0.1rem 0.35rem;
  }
  button.danger {
    border-color: var(--rb-fail);
    color: var(--rb-fail);
  }
  button:focus-visible,
  input:focus-visible,
  select:focus-visible,
  textarea:focus-visible {
    outline: 2px solid var(--rb-accent);
    outline-offset: 1px;
  }
  form.record {
    display: grid;
    grid-template-columns: max-content minmax(12rem, 22rem) minmax(10rem, 1fr);
    gap: 0.35rem 0.8rem;
    align-items: baseline;
  }
  form.record label {
    font-family: var(--rb-mono);
    font-size: 0.8rem;
    color: var(--rb-accent-ink);
    text-align: right;
  }
  form.record .hint {
    font-size: 0.8rem;
    color: var(--rb-na);
  }
  form.record .problem {
    font-size: 0.84rem;
    color: var(--rb-fail);
  }
  form.record .problem::before {
    content: '✗ ';
    font-weight: 700;
  }
  ${ruledControlStyles('form.record input, form.record select, form.record textarea', { form: true, shrink: true })}
  form.record input[aria-invalid='true'],
  form.record select[aria-invalid='true'] {
    border-bottom-color: var(--rb-fail);
    background: var(--rb-fail-bg);
  }
  form.record .group {
    grid-column: 1 / -1;
    font-variant: small-caps;
    letter-spacing: 0.06em;
    color: var(--rb-accent-ink);
    border-bottom: 1px dashed var(--rb-rule);
    margin-top: 0.5rem;
  }
  form.record .actions {
    grid-column: 2 / -1;
    display: flex;
    gap: 0.6rem;
    align-items: baseline;
    margin-top: 0.4rem;
  }
  .notice {
    padding: 0.4rem 0.7rem;
    border-left: 3px solid var(--rb-fail);
    background: var(--rb-fail-bg);
    margin: 0 0 0.8rem;
  }
  .notice::before {
    content: '✗ ';
    font-weight: 700;
    color: var(--rb-fail);
  }
  .toolbar {
    display: flex;
    gap: 0.6rem;
    align-items: baseline;
    margin: 0 0 0.8rem;
  }
  .muted {
    color: var(--rb-na);
  }
`;

/** Buttons that cannot be pressed yet say so by their look. */
export const disabledButtonStyles = css`
  button:disabled {
    opacity: 0.45;
    cursor: not-allowed;
  }
`;

/**
 * The ruled control: a rule under it in ink, paper behind it. The selector names which controls take it, since each
 * element places them differently; the options keep each place's own look: its side padding, whether its text takes
 * the ink colour, whether it may shrink in a grid cell, and the larger size of forms (`form`: 0.9rem text, more room).
 */
export function ruledControlStyles(selector: string, o: { padX?: string; ink?: boolean; shrink?: boolean; form?: boolean } = {}): CSSResult {
  const { padX = o.form ? '0.35rem' : '0.3rem', ink = true, shrink = false } = o;
  return css`
    ${unsafeCSS(selector)} {
      font: inherit;
      font-size: ${unsafeCSS(o.form ? '0.9rem' : '0.88rem')};
      padding: ${unsafeCSS(o.form ? '0.2rem' : '0.15rem')} ${unsafeCSS(padX)};
      border: 1px solid var(--rb-rule);
      border-bottom: 2px solid var(--rb-ink);
      background: var(--rb-paper);
      ${unsafeCSS(ink ? 'color: var(--rb-ink);' : '')}
      ${unsafeCSS(shrink ? 'min-width: 0;' : '')}
    }
  `;
}

/** A toolbar's search box (and choices beside it), with its labels in the toolbar's size. */
export const toolbarSearchStyles = css`
  ${ruledControlStyles(".toolbar select, .toolbar input[type='search']", { padX: '0.4rem', ink: false })}
  .toolbar label {
    font-size: 0.88rem;
  }
`;

/** A row of small tags under a form field: what a draft gives on each variant, before it is saved. */
export const previewStyles = css`
  .preview {
    grid-column: 2 / -1;
    display: flex;
    flex-wrap: wrap;
    gap: 0.3rem 0.5rem;
    font-size: 0.8rem;
  }
  .preview span {
    font-family: var(--rb-mono);
    border: 1px solid var(--rb-rule);
    padding: 0 0.35rem;
    border-radius: 3px;
  }
`;

/** Words that pass or fail: a tick line in the pass colour, a cross line in the fail colour. */
export const verdictStyles = css`
  .good {
    color: var(--rb-pass);
  }
  .bad {
    color: var(--rb-fail);
  }
`;

/** A caution in the margin: it does not stop anything, but should be read. */
export const warnStyles = css`
  .warn {
    padding: 0.4rem 0.7rem;
    border-left: 3px solid var(--rb-margin);
    background: var(--rb-margin-bg);
    margin: 0 0 0.8rem;
  }
`;

/** A message of what is wrong, in the fail colour behind a cross. */
export const problemStyles = css`
  .problem {
    color: var(--rb-fail);
    font-size: 0.84rem;
  }
  .problem::before {
    content: '✗ ';
    font-weight: 700;
  }
`;

/** A check's status in its colours, as the Checks matrix and a check's detail draw it. */
export const checkStatusStyles = css`
  .pass {
    color: var(--rb-pass);
  }
  .margin {
    color: var(--rb-margin);
    background: var(--rb-margin-bg);
  }
  .fail {
    color: var(--rb-fail);
    background: var(--rb-fail-bg);
    font-weight: 600;
  }
  .error {
    color: var(--rb-fail);
    border: 1px dashed var(--rb-fail) !important;
  }
  .na {
    color: var(--rb-na);
  }
`;
