import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { defaultDatabasePath } from './db/connection';

export interface Config {
  env: 'development' | 'production' | 'test';
  port: number;
  databasePath: string;
  /** HS256 key for session tokens. */
  sessionSecret: Uint8Array;
  /** Minutes a session token lives without activity; each request within it renews it. */
  sessionMinutes: number;
  /** Public origin of the app, used in e-mailed links. */
  publicOrigin: string;
  /** SMTP relay; unset outside production means a local fake SMTP server is started. */
  smtpUrl: string | undefined;
  version: string;
}

function readVersion(): string {
  try {
    const pkg = JSON.parse(fs.readFileSync(path.resolve(import.meta.dirname, '../package.json'), 'utf8')) as { version: string };
    return pkg.version;
  } catch {
    return '0.0.0';
  }
}

/**
 * The session key: SESSION_SECRET from the environment, or in development and the demo a random
 * key generated on first start and kept beside the database.
 */
function sessionSecret(env: Config['env'], databasePath: string): Uint8Array {
  const fromEnv = process.env.SESSION_SECRET;
  if (fromEnv) return new TextEncoder().encode(fromEnv);
  if (env === 'production') throw new Error('SESSION_SECRET must be set in production');
  if (databasePath === ':memory:') return crypto.randomBytes(32);
  const file = path.join(path.dirname(path.resolve(databasePath)), 'session-secret');
  try {
    return new Uint8Array(Buffer.from(fs.readFileSync(file, 'utf8').trim(), 'hex'));
  } catch {
    const secret = crypto.randomBytes(32);
    fs.mkdirSync(path.dirname(file), { recursive: true });
    fs.writeFileSync(file, secret.toString('hex'), { mode: 0o600 });
    return secret;
  }
}

export function loadConfig(overrides: Partial<Config> = {}): Config {
  const env = (process.env.NODE_ENV === 'production' ? 'production' : process.env.NODE_ENV === 'test' ? 'test' : 'development') as Config['env'];
  const port = Number(process.env.PORT ?? 3000);
  const databasePath = overrides.databasePath ?? defaultDatabasePath();
  return {
    env,
    port,
    databasePath,
    sessionSecret: overrides.sessionSecret ?? sessionSecret(env, databasePath),
    sessionMinutes: Number(process.env.SESSION_MINUTES ?? 60),
    publicOrigin: process.env.PUBLIC_ORIGIN ?? `http://localhost:${port}`,
    smtpUrl: process.env.SMTP_URL,
    version: readVersion(),
    ...overrides,
  };
}
