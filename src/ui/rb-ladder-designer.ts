// The step ladder designer on the Checks page: for one variant's timer and divider, the bottom resistor of each speed
// step from the duty wanted there (a list, or an even spread), snapped to an IEC 60063 series, with the duty it really
// gives; "Use these" writes r_s1…r_sN into the variant, so its build lines pick the parts by their rules.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, Variant } from '../domain/book.ts';
import { E_SERIES_NUMBERS } from '../domain/eseries.ts';
import { astableDuty, ctlNode, designLadder, ladderParams } from '../domain/ladder.ts';
import type { LadderResult } from '../domain/ladder.ts';
import { MAX_STEPS } from '../domain/params.ts';
import { formatValue } from '../domain/units.ts';
import { resolveFamily } from '../engine/family.ts';
import { BookController } from './book-context.ts';
import { CostingService } from './costing-service.ts';
import { pageStyles, ruledControlStyles } from './styles.ts';

type Mode = 'spread' | 'list';

interface Timer {
  vcc: number;
  ra: number;
  rb: number;
  rTop: number;
  steps: number;
  /** Control-pin source resistance of the timer part the variant's build lines fit (its r_ctl rating). */
  rInt: number;
}

/** The rating a variant's timer part gives the ladder: its control-pin source resistance. */
const TIMER_R_CTL = 'timer_r_ctl';

function num(v: Variant, name: string): number | undefined {
  const x = v.params[name];
  return typeof x === 'number' && Number.isFinite(x) ? x : undefined;
}

/**
 * The variant's timer and divider values, or what is missing for a ladder. `roleNames` are the variant's resolved
 * part ratings (resolveFamily): the control-pin source resistance comes from the timer part fitted, never a constant.
 */
export function timerOf(v: Variant, roleNames: Readonly<Record<string, number>>): { ok: true; timer: Timer } | { ok: false; missing: string[] } {
  const rCtl = roleNames[TIMER_R_CTL];
  const vals = { vcc: num(v, 'vcc'), ra: num(v, 'ra'), rb: num(v, 'rb'), rTop: num(v, 'r_top'), steps: num(v, 'steps'), rInt: rCtl !== undefined && rCtl > 0 ? rCtl : undefined };
  const missing = Object.entries({ vcc: vals.vcc, ra: vals.ra, rb: vals.rb, r_top: vals.rTop, steps: vals.steps, [TIMER_R_CTL]: vals.rInt })
    .filter(([, x]) => x === undefined)
    .map(([k]) => k);
  if (missing.length > 0) return { ok: false, missing };
  return { ok: true, timer: vals as Timer };
}

/** Duty at each step with the variant's present resistors (undefined where a step resistor is not set). */
export function presentDuties(v: Variant, t: Timer): (number | undefined)[] {
  return Array.from({ length: Math.min(t.steps, MAX_STEPS) }, (_, i) => {
    const r = num(v, `r_s${i + 1}`);
    return r === undefined || r <= 0 ? undefined : astableDuty(t.ra, t.rb, t.vcc, ctlNode(t.vcc, t.rTop, r, t.rInt));
  });
}

/** Reads "20, 35, 50 %" or "0.2 0.35 0.5" into fractions; numbers above 1 are percentages. */
export function readDuties(text: string): { ok: true; duties: number[] } | { ok: false; error: string } {
  const parts = text.replace(/%/g, ' ').split(/[\s,;]+/).filter((p) => p !== '');
  if (parts.length === 0) return { ok: false, error: 'give one duty per step, for example 20, 35, 50, 65, 80' };
  const out: number[] = [];
  for (const p of parts) {
    const n = Number(p);
    if (!Number.isFinite(n)) return { ok: false, error: `"${p}" is not a number` };
    out.push(n > 1 ? n / 100 : n);
  }
  return { ok: true, duties: out };
}

const pct = (d: number, digits = 1): string => `${(d * 100).toFixed(digits)} %`;

@customElement('rb-ladder-designer')
export class RbLadderDesigner extends LitElement {
  static override styles = [
    pageStyles,
    css`
      .controls {
        display: flex;
        flex-wrap: wrap;
        gap: 0.5rem 1.2rem;
        align-items: baseline;
        margin: 0 0 0.8rem;
        font-size: 0.9rem;
      }
      .controls label {
        font-family: var(--rb-mono);
        font-size: 0.78rem;
        color: var(--rb-accent-ink);
      }
      ${ruledControlStyles(".controls input[type='text'], .controls select", { ink: false })}
      .controls input[aria-invalid='true'] {
        border-bottom-color: var(--rb-fail);
        background: var(--rb-fail-bg);
      }
      .problem {
        color: var(--rb-fail);
      }
      .problem::before {
        content: '✗ ';
        font-weight: 700;
      }
      .done {
        color: var(--rb-pass);
      }
      .done::before {
        content: '✓ ';
        font-weight: 700;
      }
      td.worse {
        color: var(--rb-margin);
      }
      fieldset {
        border: none;
        padding: 0;
        margin: 0;
        display: inline-flex;
        gap: 0.6rem;
      }
    `,
  ];

  /** Variant chosen on the page (the selected cell's); the designer follows it until one is picked here. */
  @property() variantId = '';
  @state() private picked = '';
  @state() private mode: Mode = 'spread';
  @state() private low = '';
  @state() private high = '';
  @state() private list = '';
  @state() private series = 12;
  @state() private message: { tone: 'done' | 'problem'; lines: string[] } | undefined;
  private readonly books = new BookController(this, { figures: true });
  private defaultsFor = '';

  private roles: { figures: number; byVariant: Map<string, Record<string, number>> } | undefined;

  /** Each variant's resolved part ratings, as the live figures resolve them (off the page's thread). */
  private roleNames(_book: Book, v: Variant): Record<string, number> {
    const costing = CostingService.for(this.books.service!);
    const resolution = costing.resolution();
    if (this.roles?.figures !== costing.version) {
      this.roles = { figures: costing.version, byVariant: new Map(resolution.variants.map((r) => [r.variantId, r.roleNames])) };
    }
    return this.roles.byVariant.get(v.id) ?? {};
  }

  private timer(book: Book, v: Variant): ReturnType<typeof timerOf> {
    return timerOf(v, this.roleNames(book, v));
  }

  private eligible(book: Book): Variant[] {
    return book.variants.filter((v) => this.timer(book, v).ok);
  }

  private current(book: Book): Variant | undefined {
    const list = this.eligible(book);
    return list.find((v) => v.id === this.picked) ?? list.find((v) => v.id === this.variantId) ?? list[0];
  }

  /** Starting targets: the duties the variant's present ladder gives at its first and last step. */
  private ensureDefaults(v: Variant, t: Timer): void {
    if (this.defaultsFor === v.id) return;
    this.defaultsFor = v.id;
    const now = presentDuties(v, t);
    const first = now[0];
    const last = now[now.length - 1];
    this.low = first === undefined ? '20' : (first * 100).toFixed(1);
    this.high = last === undefined ? '80' : (last * 100).toFixed(1);
    this.list = now.every((d) => d !== undefined) ? now.map((d) => (d! * 100).toFixed(1)).join(', ') : '';
    this.message = undefined;
  }

  private design(t: Timer): LadderResult {
    const base = { vcc: t.vcc, ra: t.ra, rb: t.rb, rTop: t.rTop, rInt: t.rInt, series: this.series };
    if (this.mode === 'list') {
      const d = readDuties(this.list);
      if (!d.ok) return d;
      if (d.duties.length !== t.steps) return { ok: false, error: `this variant has ${t.steps} steps: give ${t.steps} duties, one per step` };
      return designLadder({ ...base, duties: d.duties });
    }
    const lo = Number(this.low.replace('%', '').trim());
    const hi = Number(this.high.replace('%', '').trim());
    if (this.low.trim() === '' || this.high.trim() === '' || !Number.isFinite(lo) || !Number.isFinite(hi)) {
      return { ok: false, error: 'give the lowest and highest duty in percent' };
    }
    return designLadder({ ...base, spread: { steps: t.steps, min: lo / 100, max: hi / 100 } });
  }

  override willUpdate(): void {
    const book = this.books.book;
    const v = book ? this.current(book) : undefined;
    const t = book && v ? this.timer(book, v) : undefined;
    if (v && t?.ok) this.ensureDefaults(v, t.timer);
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const list = this.eligible(book);
    const v = this.current(book);
    return html`<section class="sheet" aria-labelledby="ladder-h" data-testid="ladder">
      <h2 id="ladder-h">Step ladder</h2>
      <p class="why">
        The duty of the 555-type timer at each speed step is set by the control-pin voltage from r_top over the step's
        resistor, with the pin's own ⅔·Vcc behind the fitted timer part's source resistance (its r_ctl rating: about
        3.33 kΩ for a bipolar part, far higher for a CMOS one). Choose target duties; the resistors are snapped to an
        E-series and the duty they really give is shown.
      </p>
      ${!v
        ? html`<p class="empty">
            No variant has a timer and divider (vcc, ra, rb, r_top and steps, and a timer part with its r_ctl rating) to
            design a ladder for.
          </p>`
        : this.renderDesigner(book, list, v)}
    </section>`;
  }

  private renderDesigner(book: Book, list: Variant[], v: Variant): TemplateResult {
    const t = this.timer(book, v);
    if (!t.ok) return html``;
    const result = this.design(t.timer);
    const now = presentDuties(v, t.timer);
    return html`<div class="controls">
        <span
          ><label for="ladder-variant">variant</label>
          <select id="ladder-variant" @change=${(e: Event) => (this.picked = (e.target as HTMLSelectElement).value)}>
            ${list.map((x) => html`<option value=${x.id} ?selected=${x.id === v.id}>${x.code}</option>`)}
          </select></span
        >
        <span class="muted"
          >${t.timer.steps} steps · Vcc ${formatValue(t.timer.vcc, 'V')} · RA ${formatValue(t.timer.ra, 'Ω')} · RB
          ${formatValue(t.timer.rb, 'Ω')} · r_top ${formatValue(t.timer.rTop, 'Ω')} · timer source
          ${formatValue(t.timer.rInt, 'Ω')}</span
        >
      </div>
      <div class="controls">
        <fieldset>
          <legend class="muted" style="float:left;margin-right:0.5rem">targets</legend>
          <label><input type="radio" name="mode" .checked=${this.mode === 'spread'} @change=${() => (this.mode = 'spread')} /> even spread</label>
          <label><input type="radio" name="mode" .checked=${this.mode === 'list'} @change=${() => (this.mode = 'list')} /> duty per step</label>
        </fieldset>
        ${this.mode === 'spread'
          ? html`<span
                ><label for="ladder-low">lowest duty %</label>
                <input id="ladder-low" type="text" size="6" .value=${live(this.low)} @input=${(e: Event) => (this.low = (e.target as HTMLInputElement).value)}
              /></span>
              <span
                ><label for="ladder-high">highest duty %</label>
                <input id="ladder-high" type="text" size="6" .value=${live(this.high)} @input=${(e: Event) => (this.high = (e.target as HTMLInputElement).value)}
              /></span>`
          : html`<span
              ><label for="ladder-list">duties %, step 1 first</label>
              <input
                id="ladder-list"
                type="text"
                size="32"
                aria-invalid=${result.ok ? 'false' : 'true'}
                .value=${live(this.list)}
                @input=${(e: Event) => (this.list = (e.target as HTMLInputElement).value)}
            /></span>`}
        <span
          ><label for="ladder-series">series</label>
          <select id="ladder-series" @change=${(e: Event) => (this.series = Number((e.target as HTMLSelectElement).value))}>
            ${E_SERIES_NUMBERS.map((n) => html`<option value=${n} ?selected=${n === this.series}>E${n}</option>`)}
          </select></span
        >
      </div>
      ${result.ok ? this.renderTable(result, now) : html`<p class="problem" role="alert" data-testid="ladder-problem">${result.error}</p>`}
      <div class="toolbar">
        <button type="button" class="primary" ?disabled=${!result.ok} @click=${() => void this.use(v, result)}>Use these for ${v.code}</button>
        ${this.message
          ? html`<span class=${this.message.tone} role="status" data-testid="ladder-message">${this.message.lines[0]}</span>`
          : ''}
      </div>
      ${this.message && this.message.lines.length > 1
        ? html`<ul class="problem">
            ${this.message.lines.slice(1).map((l) => html`<li>${l}</li>`)}
          </ul>`
        : ''}`;
  }

  private renderTable(result: Extract<LadderResult, { ok: true }>, now: (number | undefined)[]): TemplateResult {
    return html`<div class="scroll">
      <table class="records" data-testid="ladder-table">
        <thead>
          <tr>
            <th class="num">step</th>
            <th class="num">target duty</th>
            <th class="num">control V</th>
            <th class="num">ideal R</th>
            <th class="num">E${result.series} R</th>
            <th class="num">achieved duty</th>
            <th class="num">error</th>
            <th class="num">duty now</th>
          </tr>
        </thead>
        <tbody>
          ${result.steps.map((s) => {
            const n = now[s.step - 1];
            const worse = n !== undefined && Math.abs(n - s.targetDuty) < Math.abs(s.error);
            return html`<tr>
              <td class="num">${s.step}</td>
              <td class="num">${pct(s.targetDuty)}</td>
              <td class="num">${formatValue(s.idealCtl, 'V', 4)}</td>
              <td class="num">${formatValue(s.idealR, 'Ω', 4)}</td>
              <td class="num code">${formatValue(s.chosenR, 'Ω')}</td>
              <td class="num">${pct(s.achievedDuty)}</td>
              <td class="num ${worse ? 'worse' : ''}">${s.error >= 0 ? '+' : '−'}${Math.abs(s.error * 100).toFixed(2)} pt</td>
              <td class="num">${n === undefined ? '—' : pct(n)}</td>
            </tr>`;
          })}
        </tbody>
      </table>
    </div>`;
  }

  /** Writes r_s1…r_sN (dropping step resistors beyond N) and reports the build lines that no longer find a part. */
  private async use(v: Variant, result: LadderResult): Promise<void> {
    const service = this.books.service;
    if (!service || !result.ok) return;
    const fresh = service.book.variants.find((x) => x.id === v.id);
    if (!fresh) {
      this.message = { tone: 'problem', lines: [`${v.code} was deleted elsewhere; nothing was saved.`] };
      return;
    }
    const params = { ...fresh.params };
    for (const k of Object.keys(params)) if (/^r_s\d+$/.test(k)) delete params[k];
    Object.assign(params, ladderParams(result));
    const saved = await service.save({ put: { variants: [{ ...fresh, params }] } });
    if (!saved.ok) {
      this.message = { tone: 'problem', lines: [saved.message] };
      return;
    }
    const n = result.steps.length;
    // This variant alone, as saved: its lines are known now, not when the live figures next arrive.
    const problems = resolveFamily({ ...service.book, variants: service.book.variants.filter((x) => x.id === v.id) }).problems;
    const line = `Saved r_s1…r_s${n} for ${v.code}: ${result.steps.map((s) => formatValue(s.chosenR, 'Ω')).join(', ')}.`;
    this.message =
      problems.length === 0
        ? { tone: 'done', lines: [`${line} Every build line found its part.`] }
        : {
            tone: 'problem',
            lines: [
              `${line} Some build lines find no part for the new values; add the parts or change the rules:`,
              ...problems.map((p) => `${service.book.buildLines.find((l) => l.id === p.lineId)?.designators ?? p.lineId}: ${p.message}`),
            ],
          };
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-ladder-designer': RbLadderDesigner;
  }
}
