// The mains-safety caution carried by every screen about mains circuits: one short line on screen, once per page (a
// caution met at full length on every page stops being read); the full text on printouts and exported sheets.
import { LitElement, css, html } from 'lit';
import { customElement } from 'lit/decorators.js';
import { MAINS_CAUTION, MAINS_CAUTION_SHORT } from '../domain/mains-caution.ts';

// The words live in the domain (domain/mains-caution.ts), shared with the run files and the command line.
export { MAINS_CAUTION, MAINS_CAUTION_SHORT };

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
      padding: 0.2rem 0.6rem;
      border-left: 3px solid var(--rb-margin);
      font-size: 0.84rem;
      max-width: 60rem;
    }
    .full {
      display: none;
    }
    @media print {
      .short {
        display: none;
      }
      .full {
        display: inline;
      }
    }
    strong {
      color: var(--rb-margin);
      white-space: nowrap;
    }
  `;

  override render() {
    return html`<p role="note" aria-label="Mains safety caution" title=${MAINS_CAUTION}>
      <strong>⚠ Mains</strong><span class="short">${MAINS_CAUTION_SHORT}</span><span class="full">${MAINS_CAUTION}</span>
    </p>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-mains-caution': RbMainsCaution;
  }
}
