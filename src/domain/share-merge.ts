// Two versions of one record of a shared Book, made by two people without seeing each other's change (both offline,
// say), merged field by field against the version both started from: the three-way merge two tabs already use
// (domain/merge.ts). A field only one person changed takes that person's value and is noted as taken from them; a
// field both changed differently keeps the value the sync engine chose for now and is put in front of a person with
// both values, who set each and when, so nothing is lost silently. Pure (no engine, no storage): tested in Node.
import { mergeRecord, sameValue } from './merge.ts';
import type { FieldPath } from './merge.ts';

/** One version of a record as the shared copy holds it: its fields (without the local `rev`), who saved it, when. */
export interface SharedVersion {
  record: Record<string, unknown>;
  by: string;
  /** ISO 8601 time of the save. */
  at: string;
  /** The sync engine's revision id of this version. */
  rev: string;
}

/** A field changed by one person only, merged in: whose value was taken. */
export interface TakenField {
  path: FieldPath;
  from: string;
  at: string;
}

/** A field both changed to different values: kept for a person to decide, with every value offered. */
export interface OpenField {
  path: FieldPath;
  /** The value both started from; undefined when that version is no longer held (or the field was absent). */
  base: unknown;
  /** The value kept for now (the engine's chosen version) first. */
  choices: { value: unknown; by: string; at: string; rev: string }[];
}

export interface VersionsMerged {
  /** The record to keep now: every one-sided change merged, an open field at the first choice's value. */
  record: Record<string, unknown>;
  taken: TakenField[];
  open: OpenField[];
}

/** Stands for a field of a version no longer held: never equal to any value, so a field both sides hold differently is open. */
const UNKNOWN = Symbol('unknown base');

function valueAt(x: unknown, path: FieldPath): unknown {
  let v = x;
  for (const k of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<string | number, unknown>)[k];
  }
  return v;
}

/** A copy of `x` with the field at `path` set to `value` (removed when undefined); the parents exist (merge.ts paths). */
function withValueAt(x: unknown, path: FieldPath, value: unknown): unknown {
  if (path.length === 0) return value;
  const [k, ...rest] = path as [string | number, ...(string | number)[]];
  if (Array.isArray(x)) {
    const copy = [...(x as unknown[])];
    copy[k as number] = withValueAt(copy[k as number], rest, value);
    return copy;
  }
  const copy = { ...(x as Record<string, unknown>) };
  const next = withValueAt(copy[k], rest, value);
  if (next === undefined) delete copy[k];
  else copy[k] = next;
  return copy;
}

/**
 * Merges `other` (a conflicting version) into `kept` (the version the sync engine chose), against `base`, the version
 * both were made from, or undefined when it is no longer held: then every field the two hold differently is open.
 */
export function mergeVersions(base: Record<string, unknown> | undefined, kept: SharedVersion, other: SharedVersion): VersionsMerged {
  const from: Record<string, unknown> =
    base ?? Object.fromEntries([...new Set([...Object.keys(kept.record), ...Object.keys(other.record)])].map((k) => [k, UNKNOWN]));
  const first = mergeRecord<unknown>(from, other.record, kept.record, []);
  let mine: unknown = other.record;
  const open: OpenField[] = [];
  if (!first.ok) {
    // Hold each field both changed at the kept value, so the rest merges; the field itself goes to a person.
    for (const c of first.conflicts) {
      open.push({
        path: c.path,
        base: c.base === UNKNOWN ? undefined : c.base,
        choices: [
          { value: c.theirs, by: kept.by, at: kept.at, rev: kept.rev },
          { value: c.mine, by: other.by, at: other.at, rev: other.rev },
        ],
      });
      mine = withValueAt(mine, c.path, c.theirs);
    }
  }
  const merged = first.ok ? first : mergeRecord<unknown>(from, mine, kept.record, []);
  if (!merged.ok) throw new Error('a merge with every conflicting field held at one value cannot conflict');
  const taken: TakenField[] = [
    ...merged.theirs.map((path) => ({ path, from: kept.by, at: kept.at })),
    ...merged.mine.map((path) => ({ path, from: other.by, at: other.at })),
  ];
  return { record: merged.merged as Record<string, unknown>, taken, open };
}

/** Merges every conflicting version into the kept one in turn (`bases[i]` is what `others[i]` and the kept one share). */
export function mergeAllVersions(
  kept: SharedVersion,
  others: readonly { version: SharedVersion; base: Record<string, unknown> | undefined }[],
): VersionsMerged {
  let acc: VersionsMerged = { record: kept.record, taken: [], open: [] };
  for (const { version, base } of others) {
    const r = mergeVersions(base, { ...kept, record: acc.record }, version);
    acc = { record: r.record, taken: [...acc.taken, ...r.taken], open: [...acc.open, ...r.open] };
  }
  return acc;
}

/** The record with a person's choice for an open field (one of its choices, or a value they typed). */
export function chooseValue(record: Record<string, unknown>, field: OpenField, value: unknown): Record<string, unknown> {
  return withValueAt(record, field.path, value) as Record<string, unknown>;
}

/** True when the open field still holds the value it was left at (nobody has decided it since). */
export function stillOpen(record: Record<string, unknown>, field: OpenField): boolean {
  return sameValue(valueAt(record, field.path), field.choices[0]?.value);
}
