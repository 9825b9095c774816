// Timing helpers and figure types of the benchmark that run unchanged in Node and in the bench page in Chromium
// (no Node modules here: tests/bench/page imports this file).
export type Figure = number | string | boolean | null;
export type Figures = Record<string, Figure>;

export function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/** Milliseconds one call takes. */
export function timeMs(fn: () => void): number {
  const t = performance.now();
  fn();
  return performance.now() - t;
}

export function round(n: number, digits = 1): number {
  const f = 10 ** digits;
  return Math.round(n * f) / f;
}

/** A failure as one readable line: build tools colour their messages and spread them over many lines. */
export function oneLine(e: unknown, max = 400): string {
  const message = e instanceof Error ? e.message : String(e);
  const plain = message.replace(/\u001b\[[0-9;]*m/g, '').replace(/\s+/g, ' ').trim();
  return plain.length > max ? `${plain.slice(0, max)}…` : plain;
}
