// Team page: share this Book through the team's sync server, open the team's shared Book here, or pick up the
// sharing this Book had with the password alone; a status line (synced, offline, changes waiting, conflicts to
// resolve), who changed what and when (each record's versions), and the fields two people changed apart, each with
// both values, for a person to pick one. Loaded only when visited; the sync engine itself only when sharing starts.
import { LitElement, css, html, nothing } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { joinPath } from '../domain/schema.ts';
import { localMoment } from '../domain/dates.ts';
import { placeOfDoc } from '../store/shared-docs.ts';
import type { OpenConflict, RecordVersion, ShareStatus, ShareTarget } from '../store/share-bridge.ts';
import { BookController } from './book-context.ts';
import { recordName } from './book-service.ts';
import type { BookService } from './book-service.ts';
import { field, group } from './form-fields.ts';
import { checkShareDraft, rememberedShare } from './share-session.ts';
import type { ShareDraft, ShareDraftProblems } from './share-session.ts';
import { activeShare, beginSharing, endSharing, shareEvents, sharingEndedWhy } from './team-sharing.ts';
import { pageStyles } from './styles.ts';

/** How a person names a shared record: its code, part number, title or name, as the Book holds it (or held it). */
function docName(service: BookService, docId: string, held?: Record<string, unknown>): string {
  const place = placeOfDoc(docId);
  if (!place) return docId;
  if (place.collection === 'settings') return recordName('settings', {});
  const record = (service.book[place.collection] as readonly { id: string }[]).find((r) => r.id === place.id) ?? held;
  const kind = place.collection.replace(/s$/, '');
  return record ? `${kind} ${recordName(place.collection, record)}` : `${kind} ${place.id}`;
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
      table.changes {
        border-collapse: collapse;
        margin-bottom: 1rem;
      }
      table.changes th,
      table.changes td {
        text-align: left;
        padding: 0.2rem 0.8rem 0.2rem 0;
        border-bottom: 1px solid var(--rb-rule);
        vertical-align: top;
      }
    `,
  ];

  private readonly books = new BookController(this);
  @state() private draft: ShareDraft = { server: 'http://127.0.0.1:5990/', book: 'team-book', user: '', password: '' };
  @state() private problems: ShareDraftProblems = {};
  @state() private message = '';
  @state() private busy = false;
  @state() private conflicts: OpenConflict[] = [];
  @state() private recent: RecordVersion[] = [];
  /** The record whose versions are shown, with them. */
  @state() private history: { docId: string; versions: RecordVersion[] } | undefined;
  /** The Book the draft was filled in for from what this browser remembers. */
  private filledFor: BookService | undefined;
  private listening: EventTarget | undefined;
  private refreshing: Promise<void> | undefined;
  private refreshAgain = false;
  private readonly onShare = () => void this.refresh();
  private readonly onSharing = () => {
    this.listen();
    void this.refresh();
  };

  override connectedCallback(): void {
    super.connectedCallback();
    shareEvents.addEventListener('change', this.onSharing);
    this.listen();
    void this.refresh();
  }

  override disconnectedCallback(): void {
    shareEvents.removeEventListener('change', this.onSharing);
    this.listening?.removeEventListener('change', this.onShare);
    this.listening = undefined;
    super.disconnectedCallback();
  }

  private sharing(): ReturnType<typeof activeShare> {
    const service = this.books.service;
    return service ? activeShare(service) : undefined;
  }

  /** Listens to this tab's sharing, when there is one. */
  private listen(): void {
    const bridge = this.sharing()?.bridge;
    if (this.listening === bridge) return;
    this.listening?.removeEventListener('change', this.onShare);
    bridge?.addEventListener('change', this.onShare);
    this.listening = bridge;
  }

  /** Reads the conflicts and the latest changes again (once at a time; a change meanwhile reads once more after). */
  private refresh(): Promise<void> {
    if (this.refreshing) {
      this.refreshAgain = true;
      return this.refreshing;
    }
    this.refreshing = (async () => {
      do {
        this.refreshAgain = false;
        const bridge = this.sharing()?.bridge;
        this.conflicts = bridge ? await bridge.openConflicts() : [];
        this.recent = bridge ? await bridge.recentChanges() : [];
        if (bridge && this.history) this.history = { docId: this.history.docId, versions: await bridge.recordHistory(this.history.docId) };
      } while (this.refreshAgain);
    })().finally(() => (this.refreshing = undefined));
    this.requestUpdate();
    return this.refreshing;
  }

  override willUpdate(): void {
    const service = this.books.service;
    if (!service || this.filledFor === service) return;
    this.filledFor = service;
    const kept = rememberedShare(service.name);
    if (kept) this.draft = { server: kept.server, book: kept.book, user: kept.user, password: '' };
  }

  override render(): TemplateResult {
    const service = this.books.service;
    if (!service) return html``;
    const sharing = activeShare(service);
    const ended = sharingEndedWhy();
    return html`<section class="sheet" aria-labelledby="share-h">
      <h2 id="share-h">Share this Book with your team</h2>
      <p class="why">
        A team shares one Book through a sync server the firm runs (<code>npm run team-server</code> on an office
        machine, or a CouchDB-compatible server). Each person keeps working in their own browser, online or offline;
        changes meet on the server. Owners share a Book and add people, editors change it, readers read and export it.
      </p>
      ${this.message ? html`<p class="notice" role="alert">${this.message}</p>` : nothing}
      ${!sharing && ended ? html`<p class="notice">${ended}</p>` : nothing}
      ${sharing ? this.renderShared(service, sharing.bridge.status, sharing.target) : this.renderForm(service)}
    </section>`;
  }

  private renderForm(service: BookService): TemplateResult {
    const d = this.draft;
    const p = this.problems;
    const set = (patch: Partial<ShareDraft>) => (this.draft = { ...this.draft, ...patch });
    const kept = rememberedShare(service.name);
    return html`<form class="record" novalidate aria-label="Team server" @submit=${(e: Event) => e.preventDefault()}>
      ${kept
        ? html`<p class="resume" role="status">
            This Book was shared as ${kept.user} (${kept.role}) on ${kept.server}${kept.book}. Give your password and
            resume: what changed here meanwhile is sent, and what the team changed reaches this Book.
          </p>`
        : nothing}
      ${group('team server')}
      ${field({ name: 'server', label: 'server address', value: d.server, problem: p.server, hint: 'as the team server printed it', onInput: (v) => set({ server: v }) })}
      ${field({ name: 'book', label: 'shared Book name', value: d.book, problem: p.book, hint: 'the same name for everyone on the team', onInput: (v) => set({ book: v }) })}
      ${field({ name: 'user', label: 'your name', value: d.user, problem: p.user, hint: 'as the team knows you', onInput: (v) => set({ user: v }) })}
      <label for="f-password">password</label>
      <input id="f-password" name="password" type="password" autocomplete="current-password" .value=${d.password} @input=${(e: Event) => set({ password: (e.target as HTMLInputElement).value })} aria-invalid=${p.password ? 'true' : 'false'} />
      <span class="problem" data-problem-for="password">${p.password ?? ''}</span>
      <p class="hint">The password is kept only in this tab: a reload goes on sharing, closing the tab forgets it.</p>
      <div class="actions">
        ${kept ? html`<button type="button" ?disabled=${this.busy} @click=${() => this.start(service, 'resume')}>Resume sharing</button>` : nothing}
        <button type="button" ?disabled=${this.busy} @click=${() => this.start(service, 'share')}>Share this Book</button>
        <button type="button" ?disabled=${this.busy} @click=${() => this.start(service, 'open')}>Open the shared Book here</button>
      </div>
      <p class="hint">Opening the shared Book replaces the Book kept in this browser: download a Book file of it first if you need it.</p>
    </form>`;
  }

  private renderShared(service: BookService, s: ShareStatus, target: ShareTarget): TemplateResult {
    const state = { synced: 'synced', syncing: 'syncing…', offline: 'offline — changes are kept and sent on reconnect', stopped: 'stopped' }[s.state];
    // The records listed below, counted from the list itself so the two always agree.
    const conflicts = new Set(this.conflicts.map((c) => c.docId)).size;
    return html`<p class="status" role="status">
        Shared as ${target.user} (${s.role ?? 'role unknown'}) on ${target.server}${target.book}: ${state}${s.waiting ? `; ${s.waiting} waiting to be sent` : ''}${conflicts
          ? `; ${conflicts} ${conflicts === 1 ? 'record' : 'records'} with conflicts to resolve`
          : ''}
      </p>
      ${s.role === 'reader' ? html`<p class="hint">As a reader you may read and export this Book; a change you try to save is refused and nothing is written.</p>` : nothing}
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
                <strong>${docName(service, c.docId)}</strong>, field <code>${c.field.path.reduce<string>((p, k) => joinPath(p, k), '')}</code>
                (was ${shown(c.field.base)}):
                <span class="choices">
                  ${c.field.choices.map(
                    (ch) => html`<button type="button" @click=${() => this.choose(c, ch.value)}>Keep ${shown(ch.value)}</button>
                      <small>by ${ch.by}, ${localMoment(ch.at)}</small> `,
                  )}
                </span>
                ${c.note.taken.length
                  ? html`<br /><small>Merged: ${c.note.taken.map((t) => `${t.path.reduce<string>((p, k) => joinPath(p, k), '')} from ${t.from}`).join(', ')}</small>`
                  : nothing}
              </li>`,
            )}
          </ul>`}
      ${this.renderRecent(service)}`;
  }

  /** Who changed what and when: the latest changes, and one record's versions on asking. */
  private renderRecent(service: BookService): TemplateResult {
    const fields = (v: RecordVersion) => (v.deleted ? 'deleted it' : v.changed === undefined ? 'saved it' : v.changed.length ? `changed ${v.changed.join(', ')}` : 'saved it unchanged');
    return html`<h3>Latest changes</h3>
      ${this.recent.length === 0
        ? html`<p>None yet.</p>`
        : html`<table class="changes">
            <thead>
              <tr><th scope="col">when</th><th scope="col">who</th><th scope="col">record</th><th scope="col">what</th><th scope="col">versions</th></tr>
            </thead>
            <tbody>
              ${this.recent.map(
                (v) => html`<tr>
                  <td>${localMoment(v.at)}</td>
                  <td>${v.by}</td>
                  <td>${docName(service, v.docId, v.record)}</td>
                  <td>${fields(v)}</td>
                  <td><button type="button" @click=${() => this.showHistory(v.docId)}>Versions</button></td>
                </tr>`,
              )}
            </tbody>
          </table>`}
      ${this.history
        ? html`<section class="history" aria-label="Versions">
            <h4>Versions of ${docName(service, this.history.docId, this.history.versions[0]?.record)}</h4>
            <ol>
              ${this.history.versions.map((v) => html`<li>${localMoment(v.at)}, ${v.by}: ${fields(v)}</li>`)}
            </ol>
            <p class="hint">Versions this browser saw; one made and replaced while it was away is not among them.</p>
          </section>`
        : nothing}`;
  }

  private async showHistory(docId: string): Promise<void> {
    const bridge = this.sharing()?.bridge;
    if (!bridge) return;
    this.history = { docId, versions: await bridge.recordHistory(docId) };
  }

  private async start(service: BookService, how: 'share' | 'open' | 'resume'): Promise<void> {
    const checked = checkShareDraft(this.draft);
    if (!checked.ok) {
      this.problems = checked.problems;
      this.message = 'Nothing was shared: see the fields marked.';
      return;
    }
    this.problems = {};
    this.busy = true;
    this.message = '';
    try {
      await beginSharing(service, checked.target, how);
      this.draft = { ...this.draft, password: '' };
    } catch (e) {
      this.message = `Not shared: ${(e as Error).message}`;
    } finally {
      this.busy = false;
    }
  }

  private stopSharing(): void {
    endSharing();
    this.conflicts = [];
    this.recent = [];
    this.history = undefined;
    this.requestUpdate();
  }

  private async choose(c: OpenConflict, value: unknown): Promise<void> {
    const bridge = this.sharing()?.bridge;
    if (!bridge) return;
    const r = await bridge.choose(c, value);
    this.message = r.ok ? '' : r.message;
    await this.refresh();
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-sharing-page': RbSharingPage;
  }
}
