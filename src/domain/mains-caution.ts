// The mains-safety caution, written once: the screens, the printouts, the run files (the head of the costed BOM and
// the purchase list CSVs) and the command line all take its words from here. Order documents go to suppliers and do
// not carry it.

/** The caution in full, for printouts, exported files and the command line. */
export const MAINS_CAUTION =
  'Live, non-isolated mains circuits can kill. These figures are design aids, not a certification: follow local ' +
  'electrical codes and have a qualified person review the design.';

/** The caution as the screen shows it: one line, every point of the full text kept. */
export const MAINS_CAUTION_SHORT = 'Live mains can kill. A design aid, not a certification: local codes and a qualified person’s review apply.';

/** The caution in full as plain text prints it, named by its first word (the command line's output and help). */
export const MAINS_CAUTION_LINE = `Caution: ${MAINS_CAUTION}`;

/** The label of the caution's row in the head block of a run file. */
export const MAINS_CAUTION_LABEL = 'mains caution';
