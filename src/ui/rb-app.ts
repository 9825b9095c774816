// Temporary shell until the app shell lands.
import { LitElement, html } from 'lit';
import { customElement } from 'lit/decorators.js';

@customElement('rb-app')
export class RbApp extends LitElement {
  override render() {
    return html`<p>Rungbook</p>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-app': RbApp;
  }
}
