// The rows of a long grid that are drawn: those in view in its scrolling frame and a few either side, with spacers
// standing for the rest, so a family of hundreds of variants costs the page as little as one of thirty (the bench's
// ui_* figures measure it). Grids of fewer than WINDOW_FROM rows draw every row, as before.
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import { nextTask } from '../domain/slices.ts';

/** Grids with at least this many rows draw only the rows in view. */
export const WINDOW_FROM = 60;
/** Rows drawn beyond each edge of the view, so a short scroll or a key press never shows a blank. */
const OVERSCAN = 15;
/** A row's height before one has been measured, in CSS pixels. */
const ROW_GUESS = 28;
/** The grid's scrolling frame is at most this share of the window high (its max-height in rb-grid's styles). */
export const FRAME_SHARE = 0.72;

/** Rows that fill the frame before anything has been measured: the first drawing is those alone. */
function rowsInFirstView(): number {
  const high = typeof window === 'undefined' ? 720 : window.innerHeight || 720;
  return Math.ceil((high * FRAME_SHARE) / ROW_GUESS) + 1;
}

export interface RowSlice {
  from: number;
  to: number;
  /** Heights of the spacers standing for the rows above and below, in CSS pixels. */
  before: number;
  after: number;
}

export class RowWindow implements ReactiveController {
  private first = 0;
  /**
   * The first drawing is the rows in view alone (a Book just opened draws a new grid in the task that opens it); the
   * rows below the view follow in a task of their own, after the frame that shows the first ones.
   */
  private count = rowsInFirstView();
  private rowHeight = ROW_GUESS;
  private measured = false;
  private total = 0;
  private frame = 0;
  /** The frame in which a drawn row's height is measured, while one is asked for. */
  private measuring = 0;
  /** Rows beyond the view are drawn once the first view has been shown (see measure). */
  private spare = false;
  private listening: HTMLElement | undefined;
  /** The frame's scroll position when the grid left the page, put back once it is shown again. */
  private restoreTop: number | undefined;
  /** The frame's scroll position and the rows it shows, as last followed (a grid off the page measures 0). */
  private scrolledTo = 0;
  private inView = rowsInFirstView() - 1;

  constructor(
    private readonly host: ReactiveControllerHost,
    /** The scrolling frame around the table, once drawn. */
    private readonly scroller: () => HTMLElement | null,
  ) {
    host.addController(this);
  }

  /** The rows to draw out of `total`. */
  slice(total: number): RowSlice {
    this.total = total;
    if (total < WINDOW_FROM) return { from: 0, to: total, before: 0, after: 0 };
    const from = Math.max(0, Math.min(this.first, total - 1));
    const to = Math.min(total, from + this.count);
    return { from, to, before: from * this.rowHeight, after: (total - to) * this.rowHeight };
  }

  /** Scrolls the frame so row `index` shows (when the grid draws only the rows in view); the next update draws it. */
  reach(index: number): void {
    const el = this.scroller();
    if (!el || this.total < WINDOW_FROM || index < 0) return;
    const head = el.querySelector('thead')?.getBoundingClientRect().height ?? 0;
    const top = index * this.rowHeight;
    const view = el.clientHeight - head;
    if (top < el.scrollTop) el.scrollTop = top;
    else if (top + this.rowHeight > el.scrollTop + view) el.scrollTop = top + this.rowHeight - view;
    this.follow(el);
  }

  hostConnected(): void {
    if (this.restoreTop === undefined) return;
    // Back on the page (a page switch): the grid lost its layout and its scroll position while off it, so every row it
    // holds is styled, laid out and painted afresh in the next frame. It draws only the rows in view for that frame
    // (the rows it drops are gone before any layout), and is measured, scrolled back and given its spare rows again
    // after it, as a first drawing is.
    const top = Math.floor(this.restoreTop / this.rowHeight);
    this.first = Math.max(0, Math.min(top, this.total - 1));
    this.count = this.inView + 1;
    this.measured = false;
    this.spare = false;
    this.host.requestUpdate();
  }

  hostUpdated(): void {
    const el = this.scroller();
    // A grid off the page (its page switched away) is not measured or followed until it is back.
    if (!el?.isConnected) return;
    if (this.listening !== el) {
      this.listening?.removeEventListener('scroll', this.onScroll);
      el.addEventListener('scroll', this.onScroll, { passive: true });
      this.listening = el;
    }
    if (!this.measured && this.total >= WINDOW_FROM && this.measuring === 0) {
      // Measured in the next frame, which lays the new rows out anyway: measuring here would lay the whole page out
      // within the task that drew them, one long task where there could be two.
      this.measuring = requestAnimationFrame(() => {
        this.measuring = 0;
        this.measure();
      });
    }
  }

  private measure(): void {
    const el = this.listening;
    if (!el || this.measured || this.total < WINDOW_FROM) return;
    const row = el.querySelector('tbody tr[aria-rowindex]');
    const h = row?.getBoundingClientRect().height ?? 0;
    if (h > 0) {
      this.measured = true;
      if (Math.abs(h - this.rowHeight) > 0.5) this.rowHeight = h;
      if (this.restoreTop !== undefined) {
        el.scrollTop = this.restoreTop;
        this.restoreTop = undefined;
      }
      // The rows beyond the view are drawn in the task after this frame, which lays out and paints the first view:
      // drawn from here they would be laid out in this same frame, one long task where there can be two.
      void nextTask().then(() => {
        this.spare = true;
        if (this.listening) this.follow(this.listening);
      });
    }
  }

  hostDisconnected(): void {
    const el = this.listening;
    if (el && this.total >= WINDOW_FROM) this.restoreTop = this.scrolledTo;
    el?.removeEventListener('scroll', this.onScroll);
    this.listening = undefined;
    if (this.frame !== 0) cancelAnimationFrame(this.frame);
    this.frame = 0;
    if (this.measuring !== 0) cancelAnimationFrame(this.measuring);
    this.measuring = 0;
  }

  private readonly onScroll = (): void => {
    if (this.frame !== 0) return;
    this.frame = requestAnimationFrame(() => {
      this.frame = 0;
      if (this.listening) this.follow(this.listening);
    });
  };

  /** Works out the rows in view from the frame's scroll position; draws again when they moved. */
  private follow(el: HTMLElement): void {
    this.scrolledTo = el.scrollTop;
    this.inView = Math.ceil(el.clientHeight / this.rowHeight);
    const top = Math.floor(el.scrollTop / this.rowHeight);
    const first = Math.max(0, top - OVERSCAN);
    // Rows in view and OVERSCAN either side, fewer above when the view is near the top (none below before the first
    // view is shown).
    const count = top - first + this.inView + (this.spare ? OVERSCAN : 1);
    if (first === this.first && count === this.count) return;
    this.first = first;
    this.count = count;
    this.host.requestUpdate();
  }
}
