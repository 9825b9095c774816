// Always-visible state of the stored Book: whether the last change is saved, saving or failed (with why), and how
// much of the browser's storage the site uses and whether the browser promised to keep it.
import { LitElement, css, html } from 'lit';
import { customElement } from 'lit/decorators.js';
import { BookController } from './book-context.ts';
import { SAVE_STATES } from './book-service.ts';
import { exportReminder } from './export-reminder.ts';

/** Bytes in binary multiples with a unit, for storage figures: 1536 → "1.5 KiB". */
export function formatBytes(bytes: number): string {
  if (!Number.isFinite(bytes) || bytes < 0) return 'unknown';
  const units = ['B', 'KiB', 'MiB', 'GiB', 'TiB'];
  let v = bytes;
  let i = 0;
  while (v >= 1024 && i < units.length - 1) {
    v /= 1024;
    i += 1;
  }
  const digits = i === 0 || v >= 100 ? 0 : v >= 10 ? 1 : 2;
  return `${v.toFixed(digits)} ${units[i]}`;
}

/** Made once: Date#toLocaleTimeString builds a new formatter on every call (milliseconds each time the rail draws). */
const CLOCK = new Intl.DateTimeFormat(undefined, { hour: '2-digit', minute: '2-digit', second: '2-digit' });

function clock(d: Date): string {
  return CLOCK.format(d);
}

@customElement('rb-save-state')
export class RbSaveState extends LitElement {
  static override styles = css`
    :host {
      display: block;
      font-size: 0.82rem;
      font-variant-numeric: tabular-nums;
    }
    .state {
      display: flex;
      gap: 0.4rem;
      align-items: baseline;
      font-weight: 600;
    }
    .saved {
      color: var(--rb-pass);
    }
    .saving {
      color: var(--rb-margin);
    }
    .failed {
      color: var(--rb-fail);
    }
    .muted {
      color: var(--rb-na);
      font-weight: 400;
    }
    .reminder {
      margin: 0.4rem 0 0;
      color: var(--rb-na);
    }
    .reminder.due {
      color: var(--rb-margin);
      font-weight: 600;
    }
    .reason {
      margin: 0.2rem 0 0;
      color: var(--rb-fail);
    }
    .storage {
      margin: 0.5rem 0 0;
      color: var(--rb-na);
    }
    meter {
      width: 100%;
      height: 0.5rem;
    }
  `;

  private readonly books = new BookController(this);

  override render() {
    const service = this.books.service;
    if (!service) return html``;
    const s = service.status;
    const line =
      s.state === SAVE_STATES.saved
        ? html`<span class="state saved" data-state="saved"><span aria-hidden="true">✓</span> All changes saved${s.at
              ? html` <span class="muted">at ${clock(s.at)}</span>`
              : ''}</span>`
        : s.state === SAVE_STATES.saving
          ? html`<span class="state saving" data-state="saving"><span aria-hidden="true">…</span> Saving</span>`
          : html`<span class="state failed" data-state="failed"><span aria-hidden="true">✗</span> Last change not saved</span>
              <p class="reason">${s.reason ?? ''}</p>`;
    const st = service.storage;
    const reminder = exportReminder(service.book.settings.lastExportAt, service.editsSinceExport, new Date());
    return html`<div role="status" aria-live="polite">${line}</div>
      <p class=${reminder.due ? 'reminder due' : 'reminder'} data-testid="export-reminder">
        ${reminder.due ? html`<span aria-hidden="true">⚠ </span>` : ''}${reminder.text}
      </p>
      ${service.lastRemoteChange
        ? html`<p class="storage">Updated from another tab at ${clock(service.lastRemoteChange)}</p>`
        : ''}
      ${service.remoteRefused ? html`<p class="reason" data-testid="remote-refused">${service.remoteRefused}</p>` : ''}
      ${st
        ? html`<p class="storage">
            Storage: ${formatBytes(st.usage)} used of ${formatBytes(st.quota)}
            <meter min="0" max=${st.quota || 1} .value=${st.usage} aria-label="storage used"></meter>
            ${st.persisted
              ? 'Kept until you delete it.'
              : 'Not persistent: the browser may clear it if space runs short; keep a Book file.'}
          </p>`
        : ''}`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-save-state': RbSaveState;
  }
}
