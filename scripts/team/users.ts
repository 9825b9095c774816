// The team's people and roles, kept in users.json in the team server's data folder. Passwords are stored only as
// scrypt hashes (Node's crypto.scrypt, a random salt each), never as text. The file is replaced whole on each change
// (written beside and renamed), so a reader never sees half a file.
import { randomBytes, scrypt, timingSafeEqual } from 'node:crypto';
import { existsSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

/** Who may do what: owners everything, editors change the Book, readers read and export it. */
export const ROLES = ['owner', 'editor', 'reader'] as const;
export type Role = (typeof ROLES)[number];

/** scrypt cost: N = 2^15 with r = 8 takes about 32 MiB and a few tens of milliseconds per check. */
const SCRYPT = { N: 32_768, r: 8, p: 1, keyLength: 64, maxmem: 64 * 1024 * 1024 } as const;
export const MIN_PASSWORD_LENGTH = 10;
const NAME = /^[a-z0-9][a-z0-9._-]{0,63}$/;

export interface StoredUser {
  role: Role;
  /** base64 */
  salt: string;
  /** base64 scrypt output */
  hash: string;
  N: number;
  r: number;
  p: number;
}

export interface UsersFile {
  version: 1;
  users: Record<string, StoredUser>;
}

export function usersPath(dataDir: string): string {
  return join(dataDir, 'users.json');
}

export function isRole(x: unknown): x is Role {
  return typeof x === 'string' && (ROLES as readonly string[]).includes(x);
}

/** Problems with a user name, or null when it will do. */
export function nameProblem(name: string): string | null {
  return NAME.test(name) ? null : `"${name}" cannot be a user name: use 1 to 64 lower-case letters, digits, dots, dashes or underscores, starting with a letter or digit`;
}

export function passwordProblem(password: string): string | null {
  return password.length >= MIN_PASSWORD_LENGTH ? null : `a password needs at least ${MIN_PASSWORD_LENGTH} characters`;
}

function scryptAsync(password: string, salt: Buffer, o: { N: number; r: number; p: number }): Promise<Buffer> {
  return new Promise((resolve, reject) =>
    scrypt(password, salt, SCRYPT.keyLength, { N: o.N, r: o.r, p: o.p, maxmem: SCRYPT.maxmem }, (err, key) => (err ? reject(err) : resolve(key))),
  );
}

export async function hashPassword(password: string, role: Role): Promise<StoredUser> {
  const salt = randomBytes(16);
  const hash = await scryptAsync(password, salt, SCRYPT);
  return { role, salt: salt.toString('base64'), hash: hash.toString('base64'), N: SCRYPT.N, r: SCRYPT.r, p: SCRYPT.p };
}

export async function passwordMatches(user: StoredUser, password: string): Promise<boolean> {
  const expected = Buffer.from(user.hash, 'base64');
  const got = await scryptAsync(password, Buffer.from(user.salt, 'base64'), user);
  return got.length === expected.length && timingSafeEqual(got, expected);
}

/** Reads users.json; an absent file is a team with no one yet. A damaged file is an error that names it. */
export function readUsers(dataDir: string): UsersFile {
  const path = usersPath(dataDir);
  if (!existsSync(path)) return { version: 1, users: {} };
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(path, 'utf8'));
  } catch (e) {
    throw new Error(`${path} is not readable JSON (${(e as Error).message}); restore it from a backup`, { cause: e });
  }
  const file = parsed as Partial<UsersFile>;
  if (file.version !== 1 || typeof file.users !== 'object' || file.users === null) throw new Error(`${path} is not a team users file of a version this server reads`);
  for (const [name, u] of Object.entries(file.users)) {
    if (!isRole(u?.role) || typeof u.salt !== 'string' || typeof u.hash !== 'string') throw new Error(`${path}: the entry for "${name}" is damaged; restore the file from a backup`);
  }
  return file as UsersFile;
}

export function writeUsers(dataDir: string, file: UsersFile): void {
  const path = usersPath(dataDir);
  const temp = `${path}.${process.pid}.tmp`;
  writeFileSync(temp, `${JSON.stringify(file, null, 2)}\n`, { mode: 0o600 });
  renameSync(temp, path);
}

/** A stamp that changes whenever users.json is replaced, so a running server reads it again. */
export function usersStamp(dataDir: string): string {
  try {
    const s = statSync(usersPath(dataDir));
    return `${s.mtimeMs}:${s.size}:${s.ino}`;
  } catch {
    return 'none';
  }
}

export function ownerCount(file: UsersFile): number {
  return Object.values(file.users).filter((u) => u.role === 'owner').length;
}

/** Adds a person or changes one's role (and password, when given); refuses to leave the team without an owner. */
export async function putUser(dataDir: string, name: string, change: { role: Role; password?: string }): Promise<{ created: boolean }> {
  const bad = nameProblem(name) ?? (change.password !== undefined ? passwordProblem(change.password) : null);
  if (bad) throw new Error(bad);
  const file = readUsers(dataDir);
  const old = file.users[name];
  if (!old && change.password === undefined) throw new Error(`there is no user "${name}"; a new user needs a password`);
  if (old?.role === 'owner' && change.role !== 'owner' && ownerCount(file) === 1) throw new Error(`"${name}" is the team's only owner; make someone else an owner first`);
  const next: StoredUser = change.password !== undefined ? await hashPassword(change.password, change.role) : { ...old!, role: change.role };
  writeUsers(dataDir, { ...file, users: { ...file.users, [name]: next } });
  return { created: !old };
}

/** Checks a name and password against users.json: the person's role, or null when either is wrong. */
export async function authenticate(file: UsersFile, name: string, password: string): Promise<Role | null> {
  const user = Object.hasOwn(file.users, name) ? file.users[name] : undefined;
  if (!user) {
    // Spend the same time as a real check, so an unknown name and a wrong password cannot be told apart.
    await scryptAsync(password, Buffer.alloc(16), SCRYPT);
    return null;
  }
  return (await passwordMatches(user, password)) ? user.role : null;
}
