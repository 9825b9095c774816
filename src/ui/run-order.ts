// The one order of runs: the Runs page lists them so, and the Export page starts on the first when no run was opened.
import type { Run } from '../domain/book.ts';

/** Runs by date wanted, then name. */
export function sortRuns(runs: readonly Run[]): Run[] {
  return [...runs].sort((a, b) => a.dateWanted.localeCompare(b.dateWanted) || a.name.localeCompare(b.name));
}
