// What a request to the team server asks to do, and whether a role may: the server's rule of who may do what,
// applied before the request reaches the sync engine's server, so a refused request writes nothing.
import type { Role } from './users.ts';

/** Read: any member. Write: editors and owners change Book records. Owner: databases, design documents, settings. */
export type Need = 'read' | 'write' | 'owner';

export interface Refusal {
  status: number;
  error: string;
  reason: string;
}

/** CouchDB's rule for database names, which every CouchDB-compatible server (and so PouchDB's client) follows. */
const DB_NAME = /^[a-z][a-z0-9_$()+/-]*$/;
/** POST endpoints of a database that only read (replication's and queries'). */
const READING_POSTS = new Set(['_all_docs', '_bulk_get', '_revs_diff', '_changes', '_find', '_explain', '_missing_revs']);
/** Database endpoints that change the database itself rather than records. */
const OWNER_ENDPOINTS = new Set(['_security', '_revs_limit', '_purge', '_compact', '_view_cleanup', '_index', '_design']);

export type Route = { kind: 'root' } | { kind: 'team'; path: string[] } | { kind: 'db'; db: string; need: Need } | { kind: 'unknown'; reason: string };

/** Sorts a request by its method and path (the part before any "?"). */
export function route(method: string, rawPath: string): Route {
  const path = rawPath.split('?')[0]!;
  const segments = path.split('/').filter((s) => s !== '').map((s) => safeDecode(s));
  if (segments.some((s) => s === null)) return { kind: 'unknown', reason: 'the address is not well formed' };
  const [first, second] = segments as string[];
  if (first === undefined) return { kind: 'root' };
  if (first === '_team') return { kind: 'team', path: segments.slice(1) as string[] };
  if (first.startsWith('_')) return { kind: 'unknown', reason: `${first} is not offered by the team server` };
  if (!DB_NAME.test(first)) return { kind: 'unknown', reason: `"${first}" is not a shared Book's name` };
  const reads = method === 'GET' || method === 'HEAD';
  // The database itself: reading its information is a read; creating or deleting it is an owner's.
  if (second === undefined) return { kind: 'db', db: first, need: reads ? 'read' : method === 'POST' ? 'write' : 'owner' };
  if (reads) return { kind: 'db', db: first, need: 'read' };
  if (method === 'POST' && READING_POSTS.has(second)) return { kind: 'db', db: first, need: 'read' };
  if (OWNER_ENDPOINTS.has(second)) return { kind: 'db', db: first, need: 'owner' };
  // Records, their attachments and replication checkpoints (_local/…) are written by editors.
  return { kind: 'db', db: first, need: 'write' };
}

function safeDecode(s: string): string | null {
  try {
    return decodeURIComponent(s);
  } catch {
    return null;
  }
}

const MAY: Record<Role, readonly Need[]> = { owner: ['read', 'write', 'owner'], editor: ['read', 'write'], reader: ['read'] };

/** Null when `role` may do what `need` asks; otherwise the refusal to send, in CouchDB's error shape. */
export function refusal(user: string, role: Role, need: Need): Refusal | null {
  if (MAY[role].includes(need)) return null;
  if (need === 'write') {
    return { status: 403, error: 'forbidden', reason: `${user} is a reader of this team: readers may read and export the Book but not change it. Nothing was written.` };
  }
  return { status: 403, error: 'forbidden', reason: `only an owner of this team may do this (${user} is ${role === 'editor' ? 'an editor' : 'a reader'}). Nothing was changed.` };
}
