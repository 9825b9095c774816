// Where a tab keeps its sharing of a Book between page loads, and the check of what a person types to share. The
// whole target (the password too) sits in the tab's session storage: a reload picks sharing up again, closing the tab
// forgets the password. The server, the shared Book's name and the user (never the password) sit in local storage per
// Book, so a later visit offers to resume with the password alone. No sync code is loaded here: the shell reads this
// at start, and loads the sync engine only when there is a sharing to resume.
import type { ShareTarget, TeamRole } from '../store/share-bridge.ts';

/** What a person types to share a Book. */
export interface ShareDraft {
  server: string;
  book: string;
  user: string;
  password: string;
}

export type ShareDraftProblems = Partial<Record<keyof ShareDraft, string>>;

const BOOK_NAME = /^[a-z][a-z0-9_-]{0,63}$/;
/** Longest user name or password taken (the team server's own bound is lower). */
const MAX_TEXT = 200;

/** The draft checked: a server address (http or https), a shared Book name, a user and a password. */
export function checkShareDraft(d: ShareDraft): { ok: true; target: ShareTarget } | { ok: false; problems: ShareDraftProblems } {
  const problems: ShareDraftProblems = {};
  let server = d.server.trim();
  try {
    const url = new URL(server);
    if (url.protocol !== 'http:' && url.protocol !== 'https:') problems.server = 'must start with http:// or https://';
    else if (url.username || url.password) problems.server = 'give the user and password in their own fields, not in the address';
    else server = `${url.origin}${url.pathname.endsWith('/') ? url.pathname : `${url.pathname}/`}`;
  } catch {
    problems.server = 'is not a web address (for example http://127.0.0.1:5990/)';
  }
  if (!BOOK_NAME.test(d.book.trim())) problems.book = 'lower-case letters, digits, - and _, starting with a letter (up to 64)';
  if (d.user.trim() === '') problems.user = 'is needed';
  else if (d.user.length > MAX_TEXT) problems.user = `may be at most ${MAX_TEXT} characters`;
  if (d.password === '') problems.password = 'is needed';
  else if (d.password.length > MAX_TEXT) problems.password = `may be at most ${MAX_TEXT} characters`;
  if (Object.keys(problems).length) return { ok: false, problems };
  return { ok: true, target: { server, book: d.book.trim(), user: d.user.trim(), password: d.password } };
}

const SESSION_KEY = 'rungbook-sharing';
const rememberKey = (bookName: string) => `rungbook-sharing:${bookName}`;

/** Stored text read as an object's fields, or undefined when it is missing or not the JSON of an object. */
function readStored(text: string | null): Partial<Record<string, unknown>> | undefined {
  if (text === null) return undefined;
  try {
    const v: unknown = JSON.parse(text);
    return typeof v === 'object' && v !== null ? (v as Partial<Record<string, unknown>>) : undefined;
  } catch {
    return undefined;
  }
}

/**
 * A kept draft read back from stored fields (the password may be left out): anything that is not one (edited by hand,
 * an older form) counts as nothing kept.
 */
function draftOf(v: Partial<Record<string, unknown>> | undefined): ShareDraft | undefined {
  if (!v) return undefined;
  const d = { server: v['server'], book: v['book'], user: v['user'], password: v['password'] ?? '' };
  return Object.values(d).every((x) => typeof x === 'string') ? (d as ShareDraft) : undefined;
}

function storage(kind: 'session' | 'local'): Storage | undefined {
  try {
    return kind === 'session' ? sessionStorage : localStorage;
  } catch {
    return undefined; // storage turned off: sharing is then kept only while the page is open
  }
}

/** The sharing this tab had for the Book when it was last loaded, password and all, or undefined. */
export function sessionShare(bookName: string): ShareTarget | undefined {
  const kept = draftOf(readStored(storage('session')?.getItem(SESSION_KEY) ?? null));
  const remembered = rememberedShare(bookName);
  // Kept for another Book of this browser (the Book was replaced since): not this Book's sharing.
  if (!kept || !remembered || kept.server !== remembered.server || kept.book !== remembered.book || kept.user !== remembered.user) return undefined;
  const checked = checkShareDraft(kept);
  return checked.ok ? checked.target : undefined;
}

/** A sharing remembered for later visits: where, as whom, and the role the server last gave (never the password). */
export interface RememberedShare {
  server: string;
  book: string;
  user: string;
  role: TeamRole;
}

/** The server, shared Book, user and role the Book was last shared with in this browser, or undefined. */
export function rememberedShare(bookName: string): RememberedShare | undefined {
  const stored = readStored(storage('local')?.getItem(rememberKey(bookName)) ?? null);
  const kept = draftOf(stored);
  if (!kept) return undefined;
  const role = stored?.['role'];
  if (role !== 'owner' && role !== 'editor' && role !== 'reader') return undefined;
  const checked = checkShareDraft({ ...kept, password: '-' });
  return checked.ok ? { server: checked.target.server, book: checked.target.book, user: checked.target.user, role } : undefined;
}

/** Keeps a sharing that has started: whole for this tab, without the password for later visits. */
export function keepShare(bookName: string, t: ShareTarget, role: TeamRole): void {
  storage('session')?.setItem(SESSION_KEY, JSON.stringify(t));
  storage('local')?.setItem(rememberKey(bookName), JSON.stringify({ server: t.server, book: t.book, user: t.user, role }));
}

/** Forgets the sharing of the Book: stopped by the person, or the Book replaced by another. */
export function forgetShare(bookName: string): void {
  storage('session')?.removeItem(SESSION_KEY);
  storage('local')?.removeItem(rememberKey(bookName));
}
