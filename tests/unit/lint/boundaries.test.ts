/**
 * The lint configuration holds the architecture's import boundaries (eslint.config.js): each
 * deliberate violation below, linted as if it stood at the given path, is reported by
 * `no-restricted-imports`, and the same import where it is allowed is not.
 */
import { ESLint } from 'eslint';
import { describe, expect, it } from 'vitest';

const eslint = new ESLint({
  cwd: process.cwd(),
  // Only the boundary rule: the type-aware rules need files that are part of a tsconfig project.
  ruleFilter: ({ ruleId }) => ruleId === 'no-restricted-imports' || ruleId === 'no-restricted-syntax',
  overrideConfig: { languageOptions: { parserOptions: { projectService: false, project: null } } },
});

async function boundaryMessages(filePath: string, code: string): Promise<string[]> {
  const [result] = await eslint.lintText(code, { filePath });
  return (result?.messages ?? []).filter((m) => m.ruleId === 'no-restricted-imports').map((m) => m.message);
}

async function rawSqlMessages(filePath: string, code: string): Promise<string[]> {
  const [result] = await eslint.lintText(code, { filePath });
  return (result?.messages ?? []).filter((m) => m.ruleId === 'no-restricted-syntax').map((m) => m.message);
}

describe('import boundaries', () => {
  it('the agreement engine may not import the database, a service or an I/O module', async () => {
    expect(await boundaryMessages('server/analysis/lint-case.ts', "import { openDatabase } from '../db/connection';\n")).toHaveLength(1);
    expect(await boundaryMessages('server/analysis/lint-case.ts', "import fs from 'node:fs';\n")).toHaveLength(1);
    expect(await boundaryMessages('server/analysis/lint-case.ts', "import { analyzeRatings } from './report';\n")).toEqual([]);
  });

  it('a service may not import a route', async () => {
    const messages = await boundaryMessages('server/services/lint-case.ts', "import { apiRouter } from '../routes/index';\n");
    expect(messages).toHaveLength(1);
    expect(messages[0]).toMatch(/routes → services/);
  });

  it('a feature may import neither another feature’s components nor the app shell; shared UI imports no feature', async () => {
    expect(
      await boundaryMessages(
        'src/features/exercises/components/lint-case.tsx',
        "import { x } from '../../dashboards/components/flags-page';\n",
      ),
    ).toHaveLength(1);
    expect(
      await boundaryMessages('src/features/exercises/components/lint-case.tsx', "import { x } from '../../../app/router';\n"),
    ).toHaveLength(1);
    expect(
      await boundaryMessages('src/components/lint-case.tsx', "import { x } from '../features/dashboards/components/overview-page';\n"),
    ).toHaveLength(1);
    expect(
      await boundaryMessages('src/features/exercises/components/lint-case.tsx', "import { x } from '../../../components/status';\n"),
    ).toEqual([]);
    // A feature's api/ hooks are its public face: another feature may use them.
    expect(
      await boundaryMessages(
        'src/features/exercises/components/lint-case.tsx',
        "import { useFlags } from '../../dashboards/api/get-flags';\n",
      ),
    ).toEqual([]);
  });

  it('shared/ imports nothing from the client or the server', async () => {
    expect(await boundaryMessages('shared/lint-case.ts', "import { x } from '../server/analysis';\n")).toHaveLength(1);
    expect(await boundaryMessages('shared/lint-case.ts', "import { z } from 'zod';\n")).toEqual([]);
  });
});

describe('raw prepared statements (decision record 0012)', () => {
  const code = "export const n = (ctx: any) => ctx.sqlite.prepare('select count(*) from ratings').pluck().get();\n";

  it('are reported in a server file off the list', async () => {
    const messages = await rawSqlMessages('server/services/lint-case.ts', code);
    expect(messages).toHaveLength(1);
    expect(messages[0]).toMatch(/Kysely/);
    expect(await rawSqlMessages('server/routes/lint-case.ts', code)).toHaveLength(1);
  });

  it('are allowed in the listed files, and a Kysely query anywhere', async () => {
    expect(await rawSqlMessages('server/imports/write.ts', code)).toEqual([]);
    expect(await rawSqlMessages('server/services/lint-case.ts', "export const q = (ctx: any) => ctx.db.selectFrom('ratings');\n")).toEqual(
      [],
    );
  });
});
