// Long work cut into slices. The work is written once, as a generator that yields at safe points between items; it
// is run at once where nobody waits on a page (the command line, Node tests) or a slice at a time in the page, which
// draws and answers input between slices, so a 50,000-row import never holds the page's thread for long.

/** Work that yields between items and returns its result. */
export type Sliced<T> = Generator<void, T, void>;

/** Items handled between two looks at the clock in a sliced loop: cheap items, so a look every few hundred. */
export const ITEMS_PER_LOOK = 512;

/** Runs sliced work to its end in one go. */
export function runAtOnce<T>(work: Sliced<T>): T {
  for (;;) {
    const r = work.next();
    if (r.done) return r.value;
  }
}

/**
 * A new task on the event loop. A message to a channel of our own is not held back as a chain of timeouts is (browsers
 * wait at least 4 ms between nested timeouts), so slices follow each other as soon as the page has drawn and answered.
 */
export function nextTask(): Promise<void> {
  if (typeof MessageChannel === 'undefined') return new Promise((resolve) => setTimeout(resolve, 0));
  return new Promise((resolve) => {
    const channel = new MessageChannel();
    channel.port1.onmessage = () => {
      channel.port1.close();
      resolve();
    };
    channel.port2.postMessage(undefined);
  });
}

/**
 * A new task after the page's next frame, so work started now is drawn before what follows (where there are no
 * frames, as in Node, a new task).
 */
export function afterNextFrame(): Promise<void> {
  if (typeof requestAnimationFrame === 'undefined') return nextTask();
  return new Promise((resolve) => requestAnimationFrame(() => void nextTask().then(resolve)));
}

/** Whether the platform tells idle time (a browser's idle callback); Node does not. */
export function hasIdleTime(): boolean {
  return typeof requestIdleCallback === 'function';
}

/** What `onIdle` does where there is no idle time to wait for (Node, a browser without idle callbacks). */
export type WithoutIdle = 'at once' | 'next task' | { afterMs: number };

/**
 * Runs `run` when the page is next idle, or after `maxMs` at most; where there is no idle callback, at once, in a new
 * task (the default) or after a while, as `withoutIdle` says. Every wait of the app for idle time goes through here.
 */
export function onIdle(run: () => void, maxMs: number, withoutIdle: WithoutIdle = 'next task'): void {
  if (hasIdleTime()) requestIdleCallback(() => run(), { timeout: maxMs });
  else if (withoutIdle === 'at once') run();
  else if (withoutIdle === 'next task') void nextTask().then(run);
  else setTimeout(run, withoutIdle.afterMs);
}

/** A new task when the page is next idle, or after `maxMs` at most (where there is no idle time to wait for, as in Node, a new task). */
export function whenIdle(maxMs: number): Promise<void> {
  return new Promise((resolve) => onIdle(resolve, maxMs));
}

/**
 * Runs sliced work a slice at a time: each slice runs until `budgetMs` has passed, then the next one waits for a new
 * task. Stops with an AbortError when `signal` is aborted between slices.
 */
export async function runInSlices<T>(work: Sliced<T>, options: { budgetMs?: number; signal?: AbortSignal; pause?: () => Promise<void> } = {}): Promise<T> {
  const budget = options.budgetMs ?? 12;
  const pause = options.pause ?? nextTask;
  let start = performance.now();
  for (;;) {
    const r = work.next();
    if (r.done) return r.value;
    if (performance.now() - start >= budget) {
      await pause();
      if (options.signal?.aborted) throw new DOMException('stopped', 'AbortError');
      start = performance.now();
    }
  }
}
