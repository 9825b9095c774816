// When to remind the person to download a Book file: a browser may lose its storage, and the file is the copy
// that survives. Pure, so the rule is tested in Node.

/** Days after the last Book file before the reminder shows. */
export const EXPORT_REMINDER_DAYS = 14;
/** Saved changes since the last Book file before the reminder shows. */
export const EXPORT_REMINDER_EDITS = 50;

export interface ExportReminder {
  /** What the rail says about the last Book file. */
  text: string;
  /** True when it is time to download a Book file. */
  due: boolean;
}

const DAY_MS = 24 * 60 * 60 * 1000;

/**
 * `lastExportAt` is an ISO date-time or absent; `edits` counts saved changes since then (or since the page opened
 * when there was never a file).
 */
export function exportReminder(lastExportAt: string | undefined, edits: number, now: Date): ExportReminder {
  const at = lastExportAt === undefined ? NaN : Date.parse(lastExportAt);
  if (Number.isNaN(at)) {
    return edits > 0
      ? { text: 'No Book file downloaded yet: download one to keep a copy of your changes.', due: true }
      : { text: 'No Book file downloaded yet.', due: false };
  }
  const days = Math.max(0, Math.floor((now.getTime() - at) / DAY_MS));
  const when = days === 0 ? 'today' : days === 1 ? 'yesterday' : `${days} days ago`;
  const changes = edits === 1 ? '1 change' : `${edits} changes`;
  const due = days >= EXPORT_REMINDER_DAYS || edits >= EXPORT_REMINDER_EDITS;
  return {
    text: `Last Book file ${when}${edits > 0 ? `, ${changes} since` : ''}.${due ? ' Time to download a fresh one.' : ''}`,
    due,
  };
}
