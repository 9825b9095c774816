// The moment a page first shows figures. Work that would compete with the first view for the CPU (the figures worker
// when kept figures are shown, the offline copy of the app, the other pages' code) waits for it: on a 2-core machine
// each of them slowed the first table by hundreds of milliseconds.

/** Sent on the window by a page once it shows figures for the first time. */
export const FIGURES_SHOWN = 'rb-figures-shown';

/** How long work held back for the first view waits when no page shows figures (a first page without any). */
export const FIRST_VIEW_FALLBACK_MS = 4_000;

let shown = false;
if (typeof window !== 'undefined') window.addEventListener(FIGURES_SHOWN, () => (shown = true), { once: true });

/** Tells the app that figures are on screen; once is enough, later calls do nothing. */
export function figuresShown(): void {
  if (!shown && typeof window !== 'undefined') window.dispatchEvent(new Event(FIGURES_SHOWN));
}

/**
 * Runs `run` once: after the frame that first shows figures is painted, or after `fallbackMs` when no page has shown
 * figures by then (a first page without figures).
 */
export function afterFiguresShown(run: () => void, fallbackMs: number = FIRST_VIEW_FALLBACK_MS): void {
  let done = false;
  const once = (): void => {
    if (done) return;
    done = true;
    clearTimeout(timer);
    run();
  };
  const timer = setTimeout(once, fallbackMs);
  // The event comes from the render that draws the figures: the frame is painted before the next frame's callbacks.
  const afterPaint = (): void => void requestAnimationFrame(() => setTimeout(once, 0));
  if (shown) afterPaint();
  else window.addEventListener(FIGURES_SHOWN, afterPaint, { once: true });
}
