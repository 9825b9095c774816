// The shapes of the figures the figures worker (or LiveFigures in-process) hands the page, without the engines.
import type { CollectionName } from '../domain/book.ts';
import type { ChangedCost } from './costing.ts';
import type { CheckResult, VariantResolution } from './family.ts';

/**
 * The collections the live figures are worked out from (with the settings): the worker catches up on these and on no
 * other (LiveFigures.catchUp), and the page tells from them whether a change takes the worker long (takesLong).
 * Variants and quotes may be edited in place; a change to any other of them builds a workbook again.
 */
export const FIGURES_READ = ['variants', 'quotes', 'buildLines', 'checks', 'parts', 'suppliers'] as const satisfies readonly CollectionName[];
export type FiguresCollection = (typeof FIGURES_READ)[number];

/** How a catch-up brought the figures up to date. */
export const SYNC_KINDS = {
  /** Nothing that figures depend on changed. */
  same: 'same',
  /** Workbooks edited in place; `changed` lists the unit costs that moved. */
  edited: 'edited',
  /** Workbooks built again from the Book. */
  rebuilt: 'rebuilt',
  /** Sent to the figures worker; its answer arrives as a change event. */
  pending: 'pending',
} as const;
export type SyncKind = (typeof SYNC_KINDS)[keyof typeof SYNC_KINDS];

export interface CostingChangeDetail {
  kind: SyncKind;
  /** Unit costs that changed (edited), or every one (rebuilt). */
  changed: readonly ChangedCost[];
  /** Check results were evaluated again. */
  checks: boolean;
}

/** One unit cost as the page shows it: the value, or NaN and why. */
export interface UnitCostFigure {
  variantId: string;
  run: number;
  value: number;
  problem?: string;
}

/** The figures of one catch-up, to be merged into what the page already holds. */
export interface FiguresUpdate extends CostingChangeDetail {
  runSizes: number[];
  /** Why no unit cost can be computed at all, or undefined. */
  costingError?: string;
  /** Why the checks could not be evaluated, or undefined. */
  familyError?: string;
  /** Every unit cost (when `costsFull`) or the ones that moved. */
  costs: UnitCostFigure[];
  costsFull: boolean;
  /** Check results and resolved lines of every variant (when `checksFull`) or of the variants whose checks moved. */
  variants: { variantId: string; results: CheckResult[]; lines: VariantResolution | undefined }[];
  checksFull: boolean;
}
