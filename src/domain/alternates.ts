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

/** Why costing bought the part it did for a line (shown in the costed BOM). */
export const PART_CHOICE = {
  single: 'single approved source',
  pinned: 'pinned',
  cheapest: 'cheapest approved',
  onlyInTime: 'only approved part with a quote in time',
  onlyQuoted: 'only approved part with a usable quote',
  fromStock: 'approved part in stock',
  noneInTime: 'no approved part in time: cheapest approved',
  noQuote: 'no approved part has a usable quote',
} as const;
export type PartChoiceReason = (typeof PART_CHOICE)[keyof typeof PART_CHOICE];

/** A costed line's part choice in a few words: "cheapest approved (3 approved)", "single source". */
export function choiceText(choice: { reason: string; approved: number } | undefined): string {
  if (choice === undefined) return '';
  return choice.approved > 1 ? `${choice.reason} (${choice.approved} approved)` : 'single source';
}
