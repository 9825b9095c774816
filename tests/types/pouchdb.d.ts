// The parts of PouchDB's client that Rungbook calls, typed here: the community type package declares a global
// Buffer of its own, which breaks Node's. Kept to what is used; add a member when code needs it.
declare module 'pouchdb-core' {
  export interface Doc {
    _id: string;
    _rev?: string;
    _conflicts?: string[];
    [field: string]: unknown;
  }
  export interface ReplicationResult {
    ok: boolean;
    docs_read: number;
    docs_written: number;
    doc_write_failures: number;
    last_seq: number | string;
    errors: unknown[];
  }
  export interface ReplicateOptions {
    live?: boolean;
    retry?: boolean;
    since?: number | string;
    batch_size?: number;
    checkpoint?: 'source' | 'target' | false;
  }
  /** A running replication: awaited for its result, or listened to while live. */
  export interface Replication extends PromiseLike<ReplicationResult> {
    /** Of a replication both ways (sync): each direction on its own. */
    readonly push?: Replication;
    readonly pull?: Replication;
    on(event: string, listener: (info: never) => void): this;
    once(event: string, listener: (info: never) => void): this;
    cancel(): void;
  }
  export interface Database {
    readonly name: string;
    put(doc: Doc): Promise<{ ok: boolean; id: string; rev: string }>;
    get<T extends object = Doc>(id: string, options?: { rev?: string; conflicts?: boolean; revs?: boolean; revs_info?: boolean }): Promise<T & Doc & { _revs_info?: { rev: string; status: string }[] }>;
    /** Every leaf revision named (or all of them), each with its revision history when `revs` is set. */
    get<T extends object = Doc>(id: string, options: { open_revs: string[] | 'all'; revs?: boolean }): Promise<{ ok?: T & Doc & Revisions; missing?: string }[]>;
    bulkDocs(docs: Doc[]): Promise<({ ok: true; id: string; rev: string } | { error: true | string; id: string; status?: number; message?: string })[]>;
    allDocs(options: { keys?: string[]; include_docs?: boolean; conflicts?: boolean; startkey?: string; endkey?: string }): Promise<{ rows: { id: string; key: string; value?: { rev: string; deleted?: boolean }; doc?: Doc | null; error?: string }[] }>;
    changes(options: { since?: number | string; live: true; include_docs?: boolean; conflicts?: boolean }): Changes;
    /** The changes since a sequence, at once (not live): each document's id once, with the newest sequence. */
    changes(options: { since?: number | string; live?: false; limit?: number; descending?: boolean; include_docs?: boolean }): Promise<{ results: Change[]; last_seq: number | string }>;
    close(): Promise<void>;
    info(): Promise<{ doc_count: number; update_seq: number | string }>;
    destroy(): Promise<void>;
    /** Replication both ways; `push` and `pull` hold options for one direction only. */
    sync(other: Database | string, options?: ReplicateOptions & { push?: ReplicateOptions; pull?: ReplicateOptions }): Replication;
    replicate: {
      to(target: Database | string, options?: ReplicateOptions): Replication;
      from(source: Database | string, options?: ReplicateOptions): Replication;
    };
  }
  /** A revision's history: `start` is the newest generation, `ids` newest first. */
  export interface Revisions {
    _revisions: { start: number; ids: string[] };
  }
  export interface Change {
    id: string;
    seq: number | string;
    deleted?: boolean;
    doc?: Doc;
  }
  /** A live feed of changes to a database. */
  export interface Changes {
    on(event: 'change', listener: (change: Change) => void): this;
    on(event: 'error', listener: (error: unknown) => void): this;
    cancel(): void;
  }
  export interface DatabaseOptions {
    adapter?: string;
    auth?: { username: string; password: string };
    skip_setup?: boolean;
  }
  export interface PouchDBConstructor {
    new (name: string, options?: DatabaseOptions): Database;
    plugin(plugin: PouchDBPlugin): PouchDBConstructor;
  }
  export interface PouchDBPlugin {
    readonly __pouchdbPlugin?: never;
  }
  const PouchDB: PouchDBConstructor;
  export default PouchDB;
}

declare module 'pouchdb-adapter-http' {
  /** A PouchDB plugin, handed to PouchDB.plugin(). */
  const plugin: { readonly __pouchdbPlugin?: never };
  export default plugin;
}

declare module 'pouchdb-adapter-memory' {
  /** A PouchDB plugin, handed to PouchDB.plugin(). */
  const plugin: { readonly __pouchdbPlugin?: never };
  export default plugin;
}

declare module 'pouchdb-replication' {
  /** A PouchDB plugin, handed to PouchDB.plugin(). */
  const plugin: { readonly __pouchdbPlugin?: never };
  export default plugin;
}

declare module 'pouchdb-adapter-idb' {
  /** A PouchDB plugin, handed to PouchDB.plugin(). */
  const plugin: { readonly __pouchdbPlugin?: never };
  export default plugin;
}
