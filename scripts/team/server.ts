// The team server: the sync engine's own CouchDB-compatible server (express-pouchdb over PouchDB's LevelDB store,
// keeping each shared Book in the data folder) behind a gate of ours that checks each request's user and password
// (HTTP Basic, against scrypt hashes in users.json) and the user's role before the request reaches it.
// The two engine packages ship no types: their declarations sit beside, in vendor.d.ts.
// eslint-disable-next-line @typescript-eslint/triple-slash-reference
/// <reference path="./vendor.d.ts" />
import { createHmac, randomBytes } from 'node:crypto';
import { mkdirSync } from 'node:fs';
import { createServer } from 'node:http';
import type { IncomingMessage, Server, ServerResponse } from 'node:http';
import { join } from 'node:path';
import expressPouchDB from 'express-pouchdb';
import PouchDB from 'pouchdb-node';
import { refusal, route } from './access.ts';
import { authenticate, isRole, putUser, readUsers, usersStamp } from './users.ts';
import type { Role, UsersFile } from './users.ts';

export interface TeamServerOptions {
  dataDir: string;
  host: string;
  port: number;
  /** Web origins (scheme://host:port) whose pages may talk to this server: where the app is served from. */
  allowOrigins: readonly string[];
}

const MAX_TEAM_BODY = 16 * 1024;

export async function startTeamServer(o: TeamServerOptions): Promise<Server> {
  const booksDir = join(o.dataDir, 'books');
  mkdirSync(booksDir, { recursive: true });
  const engine = expressPouchDB(PouchDB.defaults({ prefix: `${booksDir}/` }), {
    mode: 'minimumForPouchDB',
    configPath: join(o.dataDir, 'engine-config.json'),
    logPath: join(o.dataDir, 'engine-log.txt'),
  });
  const gate = new Gate(o.dataDir);
  const server = createServer((req, res) => {
    cors(req, res, o.allowOrigins);
    if (req.method === 'OPTIONS') return void end(res, 204);
    gate.handle(req, res, engine).catch((e: unknown) => send(req, res, { status: 500, error: 'server_error', reason: `the team server failed: ${(e as Error).message}` }));
  });
  // Idle connections stay open a minute, not Node's 5 s: a client busy for a few seconds (a large save, a blocked
  // event loop) otherwise sends its next request on a connection the server is closing, and it fails with nothing
  // wrong on either side (common practice for servers that clients keep connections to).
  server.keepAliveTimeout = 60_000;
  server.headersTimeout = 61_000;
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(o.port, o.host, () => resolve());
  });
  return server;
}

class Gate {
  private users: UsersFile = { version: 1, users: {} };
  private stamp = '';
  /** Checked passwords, by a keyed digest of name and password, so scrypt runs once per person, not per request. */
  private checked = new Map<string, Role>();
  private readonly key = randomBytes(32);

  constructor(private readonly dataDir: string) {}

  async handle(req: IncomingMessage, res: ServerResponse, engine: (req: IncomingMessage, res: ServerResponse) => void): Promise<void> {
    const r = route(req.method ?? 'GET', req.url ?? '/');
    if (r.kind === 'unknown') return send(req, res, { status: 404, error: 'not_found', reason: r.reason });
    const who = await this.who(req);
    if (!who) return send(req, res, { status: 401, error: 'unauthorized', reason: 'user name or password not recognised by this team server' });
    if (r.kind === 'root') return void engine(req, res);
    if (r.kind === 'team') return this.team(req, res, r.path, who);
    const refused = refusal(who.name, who.role, r.need);
    if (refused) return send(req, res, refused);
    engine(req, res);
  }

  private async who(req: IncomingMessage): Promise<{ name: string; role: Role } | null> {
    const m = /^Basic\s+([A-Za-z0-9+/=]+)\s*$/i.exec(req.headers.authorization ?? '');
    if (!m) return null;
    const text = Buffer.from(m[1]!, 'base64').toString('utf8');
    const colon = text.indexOf(':');
    if (colon < 1) return null;
    const name = text.slice(0, colon);
    const password = text.slice(colon + 1);
    const stamp = usersStamp(this.dataDir);
    if (stamp !== this.stamp) {
      this.users = readUsers(this.dataDir);
      this.stamp = stamp;
      this.checked.clear();
    }
    const digest = createHmac('sha256', this.key).update(name).update('\0').update(password).digest('base64');
    let role = this.checked.get(digest) ?? null;
    if (!role) {
      role = await authenticate(this.users, name, password);
      if (role) this.checked.set(digest, role);
    }
    return role ? { name, role } : null;
  }

  /** /_team/me: who the server takes you for. /_team/users: the team, and (owners only) adding people or setting roles. */
  private async team(req: IncomingMessage, res: ServerResponse, path: string[], who: { name: string; role: Role }): Promise<void> {
    const [what, name, extra] = path;
    if (what === 'me' && path.length === 1 && req.method === 'GET') return send(req, res, { status: 200, body: { name: who.name, role: who.role } });
    if (what !== 'users' || extra !== undefined) return send(req, res, { status: 404, error: 'not_found', reason: 'the team server offers /_team/me and /_team/users' });
    if (who.role !== 'owner') return send(req, res, refusal(who.name, who.role, 'owner')!);
    if (name === undefined && req.method === 'GET') {
      return send(req, res, { status: 200, body: Object.entries(this.users.users).map(([n, u]) => ({ name: n, role: u.role })) });
    }
    if (name === undefined || req.method !== 'PUT') return send(req, res, { status: 405, error: 'method_not_allowed', reason: 'use GET /_team/users or PUT /_team/users/<name>' });
    const body = await readJson(req);
    if (!body.ok) return send(req, res, { status: 400, error: 'bad_request', reason: body.reason });
    const { role, password } = body.value as { role?: unknown; password?: unknown };
    if (!isRole(role)) return send(req, res, { status: 400, error: 'bad_request', reason: 'role must be owner, editor or reader' });
    if (password !== undefined && typeof password !== 'string') return send(req, res, { status: 400, error: 'bad_request', reason: 'password must be text' });
    try {
      const { created } = await putUser(this.dataDir, name, password === undefined ? { role } : { role, password });
      return send(req, res, { status: created ? 201 : 200, body: { ok: true, name, role } });
    } catch (e) {
      return send(req, res, { status: 400, error: 'bad_request', reason: (e as Error).message });
    }
  }
}

function readJson(req: IncomingMessage): Promise<{ ok: true; value: unknown } | { ok: false; reason: string }> {
  return new Promise((resolve) => {
    const chunks: Buffer[] = [];
    let size = 0;
    req.on('data', (c: Buffer) => {
      size += c.length;
      if (size <= MAX_TEAM_BODY) chunks.push(c);
    });
    req.on('end', () => {
      if (size > MAX_TEAM_BODY) return resolve({ ok: false, reason: `the request is over ${MAX_TEAM_BODY} bytes` });
      try {
        resolve({ ok: true, value: JSON.parse(Buffer.concat(chunks).toString('utf8')) });
      } catch {
        resolve({ ok: false, reason: 'the request body is not JSON' });
      }
    });
  });
}

function cors(req: IncomingMessage, res: ServerResponse, allow: readonly string[]): void {
  const origin = req.headers.origin;
  if (!origin || !allow.includes(origin)) return;
  res.setHeader('Access-Control-Allow-Origin', origin);
  res.setHeader('Access-Control-Allow-Credentials', 'true');
  res.setHeader('Access-Control-Allow-Methods', 'GET, HEAD, POST, PUT, DELETE, OPTIONS');
  res.setHeader('Access-Control-Allow-Headers', 'Authorization, Content-Type, Accept');
  res.setHeader('Vary', 'Origin');
}

function end(res: ServerResponse, status: number): void {
  res.statusCode = status;
  res.end();
}

type Reply = { status: number; body: unknown } | { status: number; error: string; reason: string };

/** Answers without reaching the engine: whatever body the request carried is read and dropped, never stored. */
function send(req: IncomingMessage, res: ServerResponse, reply: Reply): void {
  const body = 'body' in reply ? reply.body : { error: reply.error, reason: reply.reason };
  req.resume();
  res.statusCode = reply.status;
  res.setHeader('Content-Type', 'application/json');
  res.end(`${JSON.stringify(body)}\n`);
}
