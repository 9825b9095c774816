// A modal question with two answers, used before anything that replaces or deletes a lot of the Book.
// `ask()` resolves true only when the person presses the confirming button.
import { LitElement, css, html } from 'lit';
import { customElement, query, state } from 'lit/decorators.js';
import { pageStyles } from './styles.ts';

export interface ConfirmRequest {
  title: string;
  message: string;
  confirmLabel: string;
  cancelLabel?: string;
}

@customElement('rb-confirm')
export class RbConfirm extends LitElement {
  static override styles = [
    pageStyles,
    css`
      dialog {
        border: 1px solid var(--rb-ink);
        border-top: 4px solid var(--rb-accent);
        background: var(--rb-sheet);
        color: var(--rb-ink);
        max-width: 32rem;
        padding: 1rem 1.2rem;
      }
      dialog::backdrop {
        background: rgb(29 35 33 / 0.35);
      }
      h2 {
        margin: 0 0 0.5rem;
        font-size: 1.1rem;
      }
      p {
        margin: 0 0 1rem;
      }
      .buttons {
        display: flex;
        gap: 0.6rem;
        justify-content: flex-end;
      }
    `,
  ];

  @state() private request: ConfirmRequest | undefined;
  @query('dialog') private dialog!: HTMLDialogElement;
  private resolve: ((yes: boolean) => void) | undefined;

  async ask(request: ConfirmRequest): Promise<boolean> {
    this.resolve?.(false);
    this.request = request;
    await this.updateComplete;
    if (!this.dialog.open) this.dialog.showModal();
    return new Promise<boolean>((resolve) => {
      this.resolve = resolve;
    });
  }

  override render() {
    const r = this.request;
    return html`<dialog @cancel=${this._onCancel} aria-labelledby="confirm-title">
      ${r
        ? html`<h2 id="confirm-title">${r.title}</h2>
            <p>${r.message}</p>
            <div class="buttons">
              <button type="button" @click=${() => this.finish(false)}>${r.cancelLabel ?? 'Keep things as they are'}</button>
              <button type="button" class="primary" @click=${() => this.finish(true)}>${r.confirmLabel}</button>
            </div>`
        : ''}
    </dialog>`;
  }

  private _onCancel(ev: Event): void {
    ev.preventDefault();
    this.finish(false);
  }

  private finish(yes: boolean): void {
    this.dialog.close();
    const resolve = this.resolve;
    this.resolve = undefined;
    this.request = undefined;
    resolve?.(yes);
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-confirm': RbConfirm;
  }
}
