/**
 * What a start does with the demo. The invented demo (accounts with the published password
 * `panelwise-demo`) is seeded into an empty database outside production, and in production only
 * when asked for explicitly (`--demo` or SEED_DEMO=1, for a public demonstration site).
 * A production start refuses a database in which demo accounts can still sign in, unless the
 * demo was asked for: their password is in the README.
 */
import type { Config } from '../config';
import type { Db } from '../db/connection';

export const DEMO_EMAIL_DOMAIN = '@demo.panelwise.test';

export interface DemoChoice {
  /** Seed the demo into an empty database. */
  seed: boolean;
  /** The operator asked for the demo (flag or SEED_DEMO=1). */
  explicit: boolean;
}

export function demoChoice(config: Pick<Config, 'env'>, argv: readonly string[], seedDemo: string | undefined): DemoChoice {
  const explicit = argv.includes('--demo') || seedDemo === '1';
  if (seedDemo === '0' && !argv.includes('--demo')) return { seed: false, explicit: false };
  return { seed: explicit || config.env !== 'production', explicit };
}

/** How many demo accounts could sign in (they have a password). */
export async function demoAccountsWithPassword(db: Db): Promise<number> {
  const row = await db
    .selectFrom('users')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('email', 'like', `%${DEMO_EMAIL_DOMAIN}`)
    .where('password_hash', 'is not', null)
    .executeTakeFirstOrThrow();
  return Number(row.n);
}

export async function siteOwnerCount(db: Db): Promise<number> {
  const row = await db
    .selectFrom('users')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('is_owner', '=', 1)
    .executeTakeFirstOrThrow();
  return Number(row.n);
}

/** Why a production start must not go on, or null. */
export async function productionRefusal(db: Db, config: Pick<Config, 'env'>, choice: DemoChoice): Promise<string | null> {
  if (config.env !== 'production' || choice.explicit) return null;
  const demo = await demoAccountsWithPassword(db);
  if (demo === 0) return null;
  return (
    `the database holds ${demo} demo account(s) (${DEMO_EMAIL_DOMAIN}) whose password is published in the README. ` +
    'Run `panelwise disable-demo` to remove their passwords (the invented demo data stays), ' +
    'or start with --demo / SEED_DEMO=1 if this is meant to be a public demonstration.'
  );
}
