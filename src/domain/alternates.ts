// Approved parts of a build line: its own part, then its approved alternates (second sources) best first. Checks
// judge every approved part; costing and planning choose among them unless one is pinned.
import type { BuildLine } from './book.ts';

/** The line's approved parts in rank order: its fixed part, then its alternates; empty for a rule line. */
export function approvedParts(line: Pick<BuildLine, 'partId' | 'alternates'>): string[] {
  return line.partId === undefined ? [] : [line.partId, ...(line.alternates ?? [])];
}

/** A fixed-part line with one approved source only: nothing to fall back on when that part cannot be had. */
export function singleSource(line: Pick<BuildLine, 'partId' | 'alternates'>): boolean {
  return line.partId !== undefined && (line.alternates ?? []).length === 0;
}
