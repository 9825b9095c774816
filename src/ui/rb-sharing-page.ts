// Team page: share this Book through the team's sync server, or open the team's shared Book here; a status line
// (synced, offline, changes waiting, conflicts to resolve) and the fields two people changed apart, each with both
// values, for a person to pick one. Loaded only when visited; the sync engine itself only when sharing starts.
import { LitElement, css, html, nothing } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { joinPath } from '../domain/schema.ts';
import { ShareBridge, askRole, createSharedBook } from '../store/share-bridge.ts';
import type { OpenConflict, ShareStatus, ShareTarget } from '../store/share-bridge.ts';
import { BookController } from './book-context.ts';
import type { BookService } from './book-service.ts';
import { field, group } from './form-fields.ts';
import { pageStyles } from './styles.ts';

interface Draft {
  server: string;
  book: string;
  user: string;
  password: string;
}

type Problems = Partial<Record<keyof Draft, string>>;

/** The one sharing of this tab: it goes on while the person visits other pages. */
let active: { bridge: ShareBridge; service: BookService; target: ShareTarget } | undefined;

const BOOK_NAME = /^[a-z][a-z0-9_-]{0,63}$/;

/** The draft checked: a server address (http or https), a shared Book name, a user and a password. */
export function checkShareDraft(d: Draft): { ok: true; target: ShareTarget } | { ok: false; problems: Problems } {
  const problems: Problems = {};
  let server = d.server.trim();
  try {
    const url = new URL(server);
    if (url.protocol !== 'http:' && url.protocol !== 'https:') problems.server = 'must start with http:// or https://';
    else if (url.username || url.password) problems.server = 'give the user and password in their own fields, not in the address';
    else server = `${url.origin}${url.pathname.endsWith('/') ? url.pathname : `${url.pathname}/`}`;
  } catch {
    problems.server = 'is not a web address (for example http://127.0.0.1:5990/)';
  }
  if (!BOOK_NAME.test(d.book.trim())) problems.book = 'lower-case letters, digits, - and _, starting with a letter (up to 64)';
  if (d.user.trim() === '') problems.user = 'is needed';
  if (d.password === '') problems.password = 'is needed';
  if (Object.keys(problems).length) return { ok: false, problems };
  return { ok: true, target: { server, book: d.book.trim(), user: d.user.trim(), password: d.password } };
}

function shown(v: unknown): string {
  if (v === undefined) return 'nothing (removed)';
  return typeof v === 'string' ? `“${v}”` : JSON.stringify(v);
}

@customElement('rb-sharing-page')
export class RbSharingPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      .status {
        font-weight: 600;
      }
      .conflicts li {
        margin-bottom: 0.6rem;
      }
      .choices button {
        margin-right: 0.5rem;
      }
    `,
  ];

  private readonly books = new BookController(this);
  @state() private draft: Draft = { server: 'http://127.0.0.1:5990/', book: 'team-book', user: '', password: '' };
  @state() private problems: Problems = {};
  @state() private message = '';
  @state() private busy = false;
  @state() private conflicts: OpenConflict[] = [];
  private readonly onShare = () => void this.refresh();

  override connectedCallback(): void {
    super.connectedCallback();
    active?.bridge.addEventListener('change', this.onShare);
    void this.refresh();
  }

  override disconnectedCallback(): void {
    active?.bridge.removeEventListener('change', this.onShare);
    super.disconnectedCallback();
  }

  private async refresh(): Promise<void> {
    this.conflicts = active ? await active.bridge.openConflicts() : [];
    this.requestUpdate();
  }

  override render(): TemplateResult {
    const service = this.books.service;
    if (!service) return html``;
    const sharing = active && active.service === service ? active : undefined;
    return html`<section class="sheet" aria-labelledby="share-h">
      <h2 id="share-h">Share this Book with your team</h2>
      <p class="why">
        A team shares one Book through a sync server the firm runs (<code>npm run team-server</code> on an office
        machine, or a CouchDB-compatible server). Each person keeps working in their own browser, online or offline;
        changes meet on the server. Owners share a Book and add people, editors change it, readers read and export it.
      </p>
      ${this.message ? html`<p class="notice" role="alert">${this.message}</p>` : nothing}
      ${sharing ? this.renderShared(sharing.bridge.status, sharing.target) : this.renderForm(service)}
    </section>`;
  }

  private renderForm(service: BookService): TemplateResult {
    const d = this.draft;
    const p = this.problems;
    const set = (patch: Partial<Draft>) => (this.draft = { ...this.draft, ...patch });
    return html`<form class="record" novalidate aria-label="Team server" @submit=${(e: Event) => e.preventDefault()}>
      ${group('team server')}
      ${field({ name: 'server', label: 'server address', value: d.server, problem: p.server, hint: 'as the team server printed it', onInput: (v) => set({ server: v }) })}
      ${field({ name: 'book', label: 'shared Book name', value: d.book, problem: p.book, hint: 'the same name for everyone on the team', onInput: (v) => set({ book: v }) })}
      ${field({ name: 'user', label: 'your name', value: d.user, problem: p.user, hint: 'as the team knows you', onInput: (v) => set({ user: v }) })}
      <label for="f-password">password</label>
      <input id="f-password" name="password" type="password" autocomplete="current-password" .value=${d.password} @input=${(e: Event) => set({ password: (e.target as HTMLInputElement).value })} aria-invalid=${p.password ? 'true' : 'false'} />
      <span class="problem">${p.password ?? ''}</span>
      <p class="hint">The password is kept only while this tab is open.</p>
      <div class="actions">
        <button type="button" ?disabled=${this.busy} @click=${() => this.start(service, 'share')}>Share this Book</button>
        <button type="button" ?disabled=${this.busy} @click=${() => this.start(service, 'open')}>Open the shared Book here</button>
      </div>
      <p class="hint">Opening the shared Book replaces the Book kept in this browser: download a Book file of it first if you need it.</p>
    </form>`;
  }

  private renderShared(s: ShareStatus, target: ShareTarget): TemplateResult {
    const state = { synced: 'synced', syncing: 'syncing…', offline: 'offline — changes are kept and sent on reconnect', stopped: 'stopped' }[s.state];
    return html`<p class="status" role="status">
        Shared as ${target.user} (${s.role ?? 'role unknown'}) on ${target.server}${target.book}: ${state}${s.waiting ? `; ${s.waiting} waiting to be sent` : ''}${s.conflicts
          ? `; ${s.conflicts} ${s.conflicts === 1 ? 'record' : 'records'} with conflicts to resolve`
          : ''}
      </p>
      ${s.error ? html`<p class="notice">${s.error}</p>` : nothing}
      ${s.problems.length
        ? html`<p class="notice">Shared records kept out of this Book because they do not fit it:</p>
            <ul>
              ${s.problems.map((p) => html`<li><code>${p.place}</code>: ${p.message}</li>`)}
            </ul>`
        : nothing}
      <div class="actions">
        <button type="button" @click=${() => this.stopSharing()}>Stop sharing in this tab</button>
      </div>
      <h3>Conflicts to resolve</h3>
      ${this.conflicts.length === 0
        ? html`<p>None: every change made apart was merged.</p>`
        : html`<ul class="conflicts">
            ${this.conflicts.map(
              (c) => html`<li>
                <strong>${c.docId}</strong>, field <code>${c.field.path.reduce<string>((p, k) => joinPath(p, k), '')}</code>
                (was ${shown(c.field.base)}):
                <span class="choices">
                  ${c.field.choices.map(
                    (ch) => html`<button type="button" @click=${() => this.choose(c, ch.value)}>Keep ${shown(ch.value)}</button>
                      <small>by ${ch.by}, ${new Date(ch.at).toLocaleString()}</small> `,
                  )}
                </span>
                ${c.note.taken.length
                  ? html`<br /><small>Merged: ${c.note.taken.map((t) => `${t.path.reduce<string>((p, k) => joinPath(p, k), '')} from ${t.from}`).join(', ')}</small>`
                  : nothing}
              </li>`,
            )}
          </ul>`}`;
  }

  private async start(service: BookService, how: 'share' | 'open'): Promise<void> {
    const checked = checkShareDraft(this.draft);
    if (!checked.ok) {
      this.problems = checked.problems;
      this.message = 'Nothing was shared: see the fields marked.';
      return;
    }
    this.problems = {};
    this.busy = true;
    this.message = '';
    const target = checked.target;
    try {
      const role = await askRole(target);
      if (how === 'share') {
        if (role !== 'owner') throw new Error(`Only an owner of the team may share a Book (${target.user} is ${role === 'editor' ? 'an editor' : 'a reader'}).`);
        await createSharedBook(target);
      } else {
        const replaced = await service.replaceBook(service.empty());
        if (!replaced.ok) throw new Error(replaced.message);
      }
      const bridge = await ShareBridge.open({ side: service, target, replicaName: `${service.name}-shared-${target.book}` });
      if (how === 'share') await bridge.shareWholeBook();
      bridge.start();
      active = { bridge, service, target };
      bridge.addEventListener('change', this.onShare);
      this.draft = { ...this.draft, password: '' };
    } catch (e) {
      this.message = `Not shared: ${(e as Error).message}`;
    } finally {
      this.busy = false;
    }
  }

  private stopSharing(): void {
    active?.bridge.removeEventListener('change', this.onShare);
    active?.bridge.close();
    active = undefined;
    this.conflicts = [];
    this.requestUpdate();
  }

  private async choose(c: OpenConflict, value: unknown): Promise<void> {
    if (!active) return;
    const r = await active.bridge.choose(c, value);
    this.message = r.ok ? '' : r.message;
    await this.refresh();
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-sharing-page': RbSharingPage;
  }
}
