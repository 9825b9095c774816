// The mains-safety caution carried by every screen about mains circuits.
import { LitElement, css, html } from 'lit';
import { customElement } from 'lit/decorators.js';

export const MAINS_CAUTION =
  'Live, non-isolated mains circuits can kill. These figures are design aids, not a certification: follow local ' +
  'electrical codes and have a qualified person review the design.';

@customElement('rb-mains-caution')
export class RbMainsCaution extends LitElement {
  static override styles = css`
    :host {
      display: block;
      margin: 0 0 1.2rem;
    }
    p {
      margin: 0;
      display: flex;
      gap: 0.6rem;
      align-items: baseline;
      padding: 0.45rem 0.8rem;
      border: 1px solid var(--rb-margin);
      border-left-width: 4px;
      background: var(--rb-margin-bg);
      font-size: 0.9rem;
      max-width: 60rem;
    }
    strong {
      color: var(--rb-margin);
      white-space: nowrap;
    }
  `;

  override render() {
    return html`<p role="note" aria-label="Mains safety caution"><strong>⚠ Mains</strong><span>${MAINS_CAUTION}</span></p>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-mains-caution': RbMainsCaution;
  }
}
