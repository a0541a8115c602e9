/**
 * The operator's commands of the `panelwise` command line (see docs/operations.md):
 *
 *   panelwise create-owner EMAIL [--name "Display Name"]   the first (or another) site owner
 *   panelwise backup OUT_FILE                              a checked copy of the live database
 *   panelwise restore FILE                                 replace the database (server stopped)
 *   panelwise disable-demo                                 remove the demo accounts' passwords
 *
 * Each reads DATABASE_PATH (default data/panelwise.db). create-owner asks for the password
 * twice on a terminal, or reads its first line from standard input (for scripts).
 * Exit codes: 0 done, 1 refused or failed (the reason on stderr), 2 usage.
 */
import fs from 'node:fs';
import readline from 'node:readline';
import { Writable } from 'node:stream';
import { defaultDatabasePath, envName } from '../config';
import { openDatabase } from '../db/connection';
import { migrateToLatest, migrationsFolder } from '../db/migrate';
import { backupDatabase, OpsError, restoreDatabase, type DatabaseSummary } from '../ops/backup';
import { disableDemoAccounts, createOwner } from '../ops/owner';
import { sessionSecretFile } from '../config';
import { type OPS_COMMANDS, OPS_USAGE } from './ops-usage';

export type OpsCommand = (typeof OPS_COMMANDS)[number];

class Usage extends Error {}

const out = (line: string) => process.stdout.write(`${line}\n`);
const megabytes = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(1)} MB`;

function describe(s: DatabaseSummary): string {
  return `${megabytes(s.bytes)}, integrity_check ok, ${s.federations} federation(s), ${s.assessments} assessment(s), ${s.users} account(s), schema ${s.migration ?? 'not migrated'}`;
}

function knownMigrations(): string[] {
  return fs
    .readdirSync(migrationsFolder)
    .filter((f) => /\.(ts|js|mjs)$/.test(f) && !f.endsWith('.d.ts'))
    .map((f) => f.replace(/\.(ts|js|mjs)$/, ''));
}

/** Reads a line from the terminal without echoing it. */
async function askHidden(question: string): Promise<string> {
  let muted = false;
  const output = new Writable({
    write(chunk: Buffer, _encoding, callback) {
      if (!muted) process.stdout.write(chunk);
      callback();
    },
  });
  const rl = readline.createInterface({ input: process.stdin, output, terminal: true });
  try {
    return await new Promise<string>((resolve) => {
      rl.question(question, (answer) => resolve(answer));
      muted = true;
    });
  } finally {
    rl.close();
    process.stdout.write('\n');
  }
}

async function readPassword(): Promise<string> {
  if (process.stdin.isTTY) {
    const first = await askHidden('Password for the site owner: ');
    const second = await askHidden('The same password again: ');
    if (first !== second) throw new OpsError('the two passwords differ');
    return first;
  }
  const chunks: Buffer[] = [];
  for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
  const text = Buffer.concat(chunks).toString('utf8');
  const line = text.split(/\r?\n/)[0] ?? '';
  if (!line) throw new OpsError('no password on standard input (its first line is the password)');
  return line;
}

function positional(args: string[], what: string): { value: string; flags: Record<string, string> } {
  const flags: Record<string, string> = {};
  const rest: string[] = [];
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (a === '--name') {
      const v = args[++i];
      if (v === undefined) throw new Usage('--name needs a value');
      flags.name = v;
    } else if (a.startsWith('--name=')) flags.name = a.slice('--name='.length);
    else if (a.startsWith('-')) throw new Usage(`unknown option ${a}`);
    else rest.push(a);
  }
  if (rest.length === 0) throw new Usage(`missing ${what}`);
  if (rest.length > 1) throw new Usage(`unexpected argument "${rest[1]}"`);
  return { value: rest[0], flags };
}

async function run(command: OpsCommand, args: string[]): Promise<void> {
  const databasePath = defaultDatabasePath();
  const env = envName(process.env.NODE_ENV);
  if (command === 'backup') {
    const { value } = positional(args, 'OUT_FILE');
    const summary = await backupDatabase(databasePath, value);
    out(`panelwise: wrote ${value}: ${describe(summary)}`);
    out(
      `panelwise: not in the copy: the session key (SESSION_SECRET, or ${sessionSecretFile(databasePath)}; without it everyone signs in again) ` +
        'and staged dry runs (import-staging/; they are uploaded again)',
    );
    return;
  }
  if (command === 'restore') {
    const { value } = positional(args, 'FILE');
    const result = restoreDatabase(databasePath, value, knownMigrations());
    out(`panelwise: restored ${databasePath} from ${value}: ${describe(result.summary)}`);
    if (result.keptAs) out(`panelwise: the replaced database is kept as ${result.keptAs}`);
    if (result.stagedRemoved > 0)
      out(`panelwise: removed ${result.stagedRemoved} staged dry run(s) of the replaced database; leads upload those files again`);
    out('panelwise: start the server: it applies any newer migrations to the restored database');
    return;
  }
  if (args.length > 0 && command === 'disable-demo') throw new Usage(`unexpected argument "${args[0]}"`);
  const { db } = openDatabase(databasePath);
  try {
    await migrateToLatest(db);
    if (command === 'disable-demo') {
      const n = await disableDemoAccounts(db);
      out(
        n === 0
          ? 'panelwise: no demo account can sign in; nothing changed'
          : `panelwise: removed the passwords of ${n} demo account(s) and signed them out`,
      );
      return;
    }
    const { value, flags } = positional(args, 'EMAIL');
    const password = await readPassword();
    const owner = await createOwner(db, { email: value, displayName: flags.name, password }, env);
    out(`panelwise: created the site owner ${owner.email} in ${databasePath}; sign in and create the first federation on the Owner page`);
  } finally {
    await db.destroy();
  }
}

/** Runs an operator's command; returns the exit code. */
export async function runOpsCommand(command: OpsCommand, args: string[]): Promise<number> {
  try {
    await run(command, args);
    return 0;
  } catch (error) {
    if (error instanceof Usage) {
      process.stderr.write(`panelwise ${command}: ${error.message}\n${OPS_USAGE.replace(/^ {7}/, 'usage: ')}\n`);
      return 2;
    }
    process.stderr.write(`panelwise ${command}: ${error instanceof OpsError ? error.message : (error as Error).message}\n`);
    return 1;
  }
}
