// One command to share Books within a team on this machine: `npm run team-server -- [command] [options]`.
//   start (the default)   runs the team server: a CouchDB-compatible sync server on 127.0.0.1 keeping the team's
//                         shared Books and users in a data folder (./team-data unless --data is given)
//   add-user NAME --role owner|editor|reader --as OWNER     adds a person
//   set-role NAME ROLE --as OWNER                           changes a person's role
//   list-users                                              shows the team
// Passwords are never taken from the command line (other users of the machine could read it): they come from
// RUNGBOOK_TEAM_PASSWORD (the new or first user's) and RUNGBOOK_TEAM_OWNER_PASSWORD (the owner named by --as), or are
// asked for at the terminal.
import { mkdirSync } from 'node:fs';
import { resolve } from 'node:path';
import { createInterface } from 'node:readline';
import { parseArgs } from 'node:util';
import { startTeamServer } from './team/server.ts';
import { authenticate, isRole, nameProblem, passwordProblem, putUser, readUsers, ROLES } from './team/users.ts';

export const DEFAULT_TEAM_PORT = 5990;
const USAGE = `usage: team-server [start] [--data DIR] [--port ${DEFAULT_TEAM_PORT}] [--host 127.0.0.1] [--owner NAME] [--allow-origin URL]…
       team-server add-user NAME --role owner|editor|reader --as OWNER [--data DIR]
       team-server set-role NAME owner|editor|reader --as OWNER [--data DIR]
       team-server list-users [--data DIR]`;

class UsageError extends Error {}

async function main(argv: string[]): Promise<void> {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: {
      data: { type: 'string' },
      port: { type: 'string' },
      host: { type: 'string' },
      owner: { type: 'string' },
      role: { type: 'string' },
      as: { type: 'string' },
      'allow-origin': { type: 'string', multiple: true },
      help: { type: 'boolean' },
    },
  });
  if (values.help) return void console.log(USAGE);
  const [command = 'start', ...rest] = positionals;
  const dataDir = resolve(values.data ?? 'team-data');
  switch (command) {
    case 'start':
      return start(dataDir, values);
    case 'add-user': {
      const [name] = rest;
      if (!name || !isRole(values.role)) throw new UsageError(`add-user needs a name and --role ${ROLES.join('|')}`);
      await asOwner(dataDir, values.as);
      const password = await secret('RUNGBOOK_TEAM_PASSWORD', `password for ${name}: `);
      const { created } = await putUser(dataDir, name, { role: values.role, password });
      return void console.log(created ? `${name} added as ${values.role}` : `${name} was already a member: role now ${values.role}, password changed`);
    }
    case 'set-role': {
      const [name, role] = rest;
      if (!name || !isRole(role)) throw new UsageError(`set-role needs a name and a role (${ROLES.join('|')})`);
      await asOwner(dataDir, values.as);
      await putUser(dataDir, name, { role });
      return void console.log(`${name} is now ${role}`);
    }
    case 'list-users': {
      const users = Object.entries(readUsers(dataDir).users);
      if (users.length === 0) return void console.log(`no users yet in ${dataDir}`);
      for (const [name, u] of users) console.log(`${name}\t${u.role}`);
      return;
    }
    default:
      throw new UsageError(`unknown command "${command}"`);
  }
}

async function start(dataDir: string, values: { port?: string; host?: string; owner?: string; 'allow-origin'?: string[] }): Promise<void> {
  const port = Number(values.port ?? process.env['PORT'] ?? DEFAULT_TEAM_PORT);
  if (!Number.isInteger(port) || port < 0 || port > 65_535) throw new UsageError(`--port must be a whole number from 0 to 65535, not "${values.port}"`);
  const host = values.host ?? '127.0.0.1';
  const team = readUsers(dataDir);
  if (Object.keys(team.users).length === 0) {
    const owner = values.owner ?? process.env['RUNGBOOK_TEAM_OWNER'];
    if (!owner) throw new UsageError(`${dataDir} has no users yet: name the first owner with --owner NAME`);
    const bad = nameProblem(owner);
    if (bad) throw new UsageError(bad);
    const password = await secret('RUNGBOOK_TEAM_PASSWORD', `password for ${owner} (the first owner): `);
    mkdirSync(dataDir, { recursive: true });
    await putUser(dataDir, owner, { role: 'owner', password });
    console.log(`${owner} is the team's first owner`);
  } else if (values.owner) {
    console.log(`the team already has users; --owner ${values.owner} is ignored (add people with add-user)`);
  }
  const allowOrigins = values['allow-origin'] ?? ['http://127.0.0.1:5173', 'http://localhost:5173'];
  const server = await startTeamServer({ dataDir, host, port, allowOrigins });
  const address = server.address();
  const actual = typeof address === 'object' && address ? address.port : port;
  const shown = host.includes(':') ? `[${host}]` : host;
  console.log(`Rungbook team server: give the app this address: http://${shown}:${actual}/`);
  console.log(`data folder ${dataDir}; pages from ${allowOrigins.join(', ')} may use it; stop with Ctrl+C`);
  const stop = (): void => {
    // Connections kept open for a next request close now; requests being answered get two seconds to finish (a
    // replication's long wait for changes would otherwise hold the stop for as long as it waits).
    server.close(() => process.exit(0));
    server.closeIdleConnections();
    setTimeout(() => server.closeAllConnections(), 2000).unref();
  };
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
}

async function asOwner(dataDir: string, name: string | undefined): Promise<void> {
  if (!name) throw new UsageError('say which owner is making the change with --as NAME');
  const password = await secret('RUNGBOOK_TEAM_OWNER_PASSWORD', `password for ${name}: `);
  const role = await authenticate(readUsers(dataDir), name, password);
  if (role === null) throw new Error(`user name or password not recognised for ${name}; nothing was changed`);
  if (role !== 'owner') throw new Error(`${name} is ${role === 'editor' ? 'an editor' : 'a reader'}: only an owner may add people or change roles; nothing was changed`);
}

/** A password from the environment variable, or asked for at the terminal without echo. */
async function secret(variable: string, prompt: string): Promise<string> {
  const fromEnv = process.env[variable];
  const password = fromEnv ?? (await ask(prompt, variable));
  const bad = passwordProblem(password);
  if (bad) throw new Error(bad);
  return password;
}

function ask(prompt: string, variable: string): Promise<string> {
  if (!process.stdin.isTTY) return Promise.reject(new Error(`no terminal to ask for a password: set ${variable}`));
  return new Promise((resolve) => {
    const rl = createInterface({ input: process.stdin, output: process.stdout, terminal: true });
    // Readline echoes what is typed through _writeToOutput: let the prompt through, then nothing of the password.
    const line = rl as unknown as { _writeToOutput(s: string): void };
    const write = line._writeToOutput.bind(rl);
    let muted = false;
    line._writeToOutput = (s: string) => {
      if (!muted) write(s);
    };
    rl.question(prompt, (answer) => {
      rl.close();
      process.stdout.write('\n');
      resolve(answer);
    });
    muted = true;
  });
}

main(process.argv.slice(2)).catch((e: unknown) => {
  console.error(`team-server: ${(e as Error).message}`);
  if (e instanceof UsageError) console.error(USAGE);
  process.exit(e instanceof UsageError ? 2 : 1);
});
