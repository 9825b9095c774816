// Types for the two server-side packages of the sync engine that ship none: only what the team server calls.
declare module 'express-pouchdb' {
  import type { IncomingMessage, ServerResponse } from 'node:http';
  type Handler = (req: IncomingMessage, res: ServerResponse) => void;
  export default function expressPouchDB(PouchDB: unknown, options?: { mode?: string; configPath?: string; logPath?: string; overrideMode?: { exclude?: string[] } }): Handler;
}

declare module 'pouchdb-node' {
  interface PouchDBStatic {
    defaults(options: { prefix?: string }): PouchDBStatic;
  }
  const PouchDB: PouchDBStatic;
  export default PouchDB;
}
