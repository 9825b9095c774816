// This process's memory for the sharing measurement: resident size now and at its peak (from /proc, Linux), and the
// JavaScript heap, after a garbage collection when the process was started with --expose-gc.
import { readFileSync } from 'node:fs';

export function memoryFigures(): { rss_mb: number; peak_rss_mb: number; heap_mb: number } {
  (globalThis as { gc?: () => void }).gc?.();
  const status = readFileSync('/proc/self/status', 'utf8');
  const kb = (field: string): number => Number(new RegExp(`${field}:\\s+(\\d+)`).exec(status)?.[1] ?? NaN);
  return { rss_mb: Math.round(kb('VmRSS') / 1024), peak_rss_mb: Math.round(kb('VmHWM') / 1024), heap_mb: Math.round(process.memoryUsage().heapUsed / 1_048_576) };
}
