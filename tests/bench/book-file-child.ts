// Run by book-file.ts in a process of its own: reads one Book file and prints its read and parse times and the
// process's peak memory as one JSON line, so the figure is the reader's alone.
import { readFileSync } from 'node:fs';
import { parseBookFile } from '../../src/io/book-file.ts';

const path = process.argv[2];
if (!path) throw new Error('usage: book-file-child.ts BOOK.rungbook.json');
const rssBefore = process.memoryUsage().rss;
let t = performance.now();
const text = readFileSync(path, 'utf8');
const readMs = performance.now() - t;
t = performance.now();
const r = parseBookFile(text);
const parseMs = performance.now() - t;
const mb = (bytes: number): number => Math.round(bytes / 1_048_576);
process.stdout.write(
  `${JSON.stringify({
    ok: r.ok,
    read_ms: Math.round(readMs),
    parse_ms: Math.round(parseMs),
    // maxRSS is in kilobytes.
    peak_rss_mb: mb(process.resourceUsage().maxRSS * 1024),
    rss_before_mb: mb(rssBefore),
  })}\n`,
);
