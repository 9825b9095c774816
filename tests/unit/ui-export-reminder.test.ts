// The reminder to download a Book file: after a number of days or of saved changes since the last one.
import { describe, expect, it } from 'vitest';
import { EXPORT_REMINDER_DAYS, EXPORT_REMINDER_EDITS, exportReminder } from '../../src/ui/export-reminder.ts';

const now = new Date('2026-03-20T12:00:00Z');

describe('export reminder', () => {
  it('stays quiet for a Book never exported and not yet edited', () => {
    expect(exportReminder(undefined, 0, now)).toEqual({ text: 'No Book file downloaded yet.', due: false });
  });

  it('asks for a file once a never-exported Book has been edited', () => {
    expect(exportReminder(undefined, 1, now).due).toBe(true);
  });

  it('counts whole days since the last file and is due from the set number of days', () => {
    // 2026-03-06T12:00Z to 2026-03-20T12:00Z is 14 × 24 h (calendar arithmetic, common practice).
    const fourteen = exportReminder('2026-03-06T12:00:00Z', 0, now);
    expect(EXPORT_REMINDER_DAYS).toBe(14);
    expect(fourteen).toEqual({ text: 'Last Book file 14 days ago. Time to download a fresh one.', due: true });
    const twelve = exportReminder('2026-03-07T12:00:01Z', 3, now);
    expect(twelve).toEqual({ text: 'Last Book file 12 days ago, 3 changes since.', due: false });
    expect(exportReminder('2026-03-20T08:00:00Z', 1, now).text).toBe('Last Book file today, 1 change since.');
  });

  it('is due after the set number of changes even when the file is recent', () => {
    expect(exportReminder('2026-03-20T08:00:00Z', EXPORT_REMINDER_EDITS - 1, now).due).toBe(false);
    expect(exportReminder('2026-03-20T08:00:00Z', EXPORT_REMINDER_EDITS, now).due).toBe(true);
  });

  it('treats an unreadable date as no file at all', () => {
    expect(exportReminder('not a date', 0, now).text).toBe('No Book file downloaded yet.');
  });
});
