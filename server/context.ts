import type BetterSqlite3 from 'better-sqlite3';
import type { Logger } from 'pino';
import type { Config } from './config';
import type { Db } from './db/connection';
import type { Mailer } from './mail/mailer';

/** What every router and service is given: the database, the configuration and the logger. */
export interface AppContext {
  db: Db;
  sqlite: BetterSqlite3.Database;
  config: Config;
  logger: Logger;
  /** E-mail over SMTP (`ctx.mailer.send({to, subject, text, html})`); absent when none was started. */
  mailer?: Mailer;
}
