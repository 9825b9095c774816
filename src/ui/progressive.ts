// Long tables drawn a slice at a time: the first rows in the first frame, then more in each frame after, so a
// table of hundreds of rows never holds the page's thread for long (the bench's ui_* figures measure this). Rows
// already drawn stay drawn; a table that grows draws its new rows the same way.
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import { nextTask } from '../domain/slices.ts';

/** Rows drawn in the first frame and added in each frame after: about 10–20 ms of drawing on a slow machine. */
export const ROWS_PER_FRAME = 30;
/** Tables up to this many rows are drawn at once, as a person reading them expects (about 0.1 s on a slow machine). */
export const ROWS_AT_ONCE = 150;

export class ProgressiveRows implements ReactiveController {
  /** How many rows may be drawn now. */
  private limit: number;
  private frame = 0;
  /** A grow is waiting for the task after the frame that draws the rows before it. */
  private waiting = false;

  constructor(
    private readonly host: ReactiveControllerHost,
    private readonly step = ROWS_PER_FRAME,
    /** Tables up to this many rows are drawn at once; fewer for rows that are heavy to draw. */
    private readonly atOnce = ROWS_AT_ONCE,
  ) {
    this.limit = step;
    host.addController(this);
  }

  /** The rows to draw in this update; when some are held back, the next frame draws more. */
  take<T>(rows: readonly T[]): readonly T[] {
    if (rows.length <= this.limit || rows.length <= this.atOnce) return rows;
    if (this.frame === 0 && !this.waiting) {
      // The frame called for now is the one that lays out and paints the rows just drawn: more rows drawn from its
      // callback would be laid out in that same frame, two slices in one task. The next slice is drawn in the task
      // after that frame instead, and laid out in the frame after.
      this.frame = requestAnimationFrame(() => {
        this.frame = 0;
        this.waiting = true;
        void nextTask().then(() => {
          if (!this.waiting) return;
          this.waiting = false;
          this.limit += this.step;
          this.host.requestUpdate();
        });
      });
    }
    return rows.slice(0, this.limit);
  }

  /** Makes sure row `index` is drawn in the next update (the keyboard moved there, say). */
  reach(index: number): void {
    if (index < this.limit) return;
    this.limit = index + this.step;
    this.host.requestUpdate();
  }

  hostConnected(): void {
    // Back on the page after a page switch: drop the rows beyond the first slice before the frame lays the table out
    // afresh (a table off the page keeps its rows but not their layout), and draw them again a slice per frame.
    if (this.limit > this.step) {
      this.limit = this.step;
      this.host.requestUpdate();
    }
  }

  hostDisconnected(): void {
    if (this.frame !== 0) cancelAnimationFrame(this.frame);
    this.frame = 0;
    this.waiting = false;
  }
}
