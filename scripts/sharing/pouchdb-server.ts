// The CouchDB-compatible server from the npm registry (express-pouchdb over PouchDB's LevelDB adapter), in the
// smallest mode PouchDB replication needs, as measured for SHARING.md.
import { createServer } from 'node:http';
import type { Server } from 'node:http';
import expressPouchDB from 'express-pouchdb';
import PouchDB from 'pouchdb-node';

export async function startPouchServer(port: number, dir: string): Promise<Server> {
  const app = expressPouchDB(PouchDB.defaults({ prefix: `${dir}/` }), { mode: 'minimumForPouchDB', configPath: `${dir}/config.json`, logPath: `${dir}/log.txt` });
  const server = createServer(app);
  await new Promise<void>((resolve) => server.listen(port, '127.0.0.1', resolve));
  return server;
}
