// @ts-check
/**
 * Lint configuration (flat config): typescript-eslint with type information, the rules of
 * React hooks, and the import boundaries of the architecture (DEVELOPERS.md):
 *
 *   client   src/components, src/lib  →  src/features/<feature>  →  src/app
 *            (a feature imports no other feature's components — only its api/ hooks — nor the app shell)
 *   server   routes → services → db / analysis; analysis is pure (no I/O of any kind)
 *   shared/  imports nothing from src/ or server/
 *
 * Boundaries use ESLint's own `no-restricted-imports` with patterns per folder, so a violation
 * names the rule it breaks. tests/lint/ holds a deliberate violation that a test lints.
 */
import fs from 'node:fs';
import js from '@eslint/js';
import globals from 'globals';
import reactHooks from 'eslint-plugin-react-hooks';
import tseslint from 'typescript-eslint';

const features = fs
  .readdirSync(new URL('./src/features', import.meta.url), { withFileTypes: true })
  .filter((d) => d.isDirectory())
  .map((d) => d.name);

/** @param {string[]} groups @param {string} message */
const restrict = (groups, message) => ({ group: groups, message });

/** Boundaries: each entry is files → import patterns they may not use. */
const boundaries = [
  {
    files: ['shared/**/*.ts'],
    patterns: [
      restrict(
        ['**/src/**', '**/server/**', 'react', 'react-dom', 'express', 'kysely', 'better-sqlite3', 'node:*'],
        'shared/ is used by client and server: it imports neither, nor any I/O.',
      ),
    ],
  },
  {
    files: ['server/analysis/**/*.ts'],
    patterns: [
      restrict(
        [
          '**/db/**',
          '**/services/**',
          '**/routes/**',
          '**/http/**',
          '**/imports/**',
          '**/exports/**',
          '**/mail/**',
          'express',
          'kysely',
          'better-sqlite3',
          'node:fs',
          'node:fs/*',
          'node:net',
          'node:http',
          'node:child_process',
          'pino',
        ],
        'server/analysis/ is pure statistics: typed arrays and count tables in, numbers out, no I/O.',
      ),
    ],
  },
  {
    files: [
      'server/services/**/*.ts',
      'server/db/**/*.ts',
      'server/imports/**/*.ts',
      'server/exports/**/*.ts',
      'server/mail/**/*.ts',
      'server/auth/**/*.ts',
      'server/workers/**/*.ts',
    ],
    patterns: [
      restrict(
        ['**/routes/**', '../routes', './routes'],
        'Layers run one way: routes → services → db/analysis; nothing below imports a route.',
      ),
    ],
  },
  {
    files: ['src/components/**/*.{ts,tsx}', 'src/lib/**/*.{ts,tsx}'],
    patterns: [
      restrict(['**/features/**', '**/app/**'], 'src/components and src/lib are shared UI: they import no feature and not the app shell.'),
    ],
  },
  ...features.map((feature) => ({
    files: [`src/features/${feature}/**/*.{ts,tsx}`],
    patterns: [
      restrict(['**/app/**'], 'A feature does not import the app shell (src/app); move what it needs to src/lib or src/components.'),
      restrict(
        features
          .filter((f) => f !== feature)
          .flatMap((f) => [`**/features/${f}/components/**`, `../../${f}/components/**`, `**/features/${f}/routes`, `../../${f}/routes`]),
        `A feature does not import another feature's components; use its api/ hooks, or move what both need to src/lib or src/components.`,
      ),
    ],
  })),
];

/**
 * Raw prepared statements (better-sqlite3's `prepare`) only in these files, each for its reason
 * (docs/decisions/0012-raw-prepared-statements.md); everywhere else in server/, Kysely.
 */
const RAW_SQL_FILES = [
  'server/imports/plan.ts', // hot loop: the import's plan reads the federation's codes and keys in bulk
  'server/imports/write.ts', // hot loop inside the commit's synchronous transaction
  'server/imports/service.ts', // commit, revert, expiry: synchronous transactions with their audit entries
  'server/services/analytics-data.ts', // hot: every rating of a federation into the rating set, in a synchronous builder
  'server/services/calibration-flags.ts', // the evaluation's flag rows and audit entries in one synchronous transaction
  'server/services/research-cells.ts', // the federation's k, read by the synchronous code that cuts research views
  'server/services/audit.ts', // auditSync, the audit writer of the synchronous transactions
  'server/workers/jobs.ts', // the durable job's record is written before enqueue returns
  'server/demo/seed.ts', // bulk insert of the demo in one synchronous transaction
  'server/ops/backup.ts', // a backup file checked on a connection of its own, outside the app
];

export default tseslint.config(
  {
    ignores: [
      'dist/**',
      'node_modules/**',
      'test-results/**',
      'playwright-report/**',
      'bench/out/**',
      'data/**',
      'coverage/**',
      'tests/lint/fixtures/**',
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommendedTypeChecked,
  {
    languageOptions: {
      parserOptions: { projectService: { allowDefaultProject: ['*.js', 'bin/*.js'] }, tsconfigRootDir: import.meta.dirname },
      globals: { ...globals.node },
    },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'inline-type-imports' }],
      '@typescript-eslint/no-floating-promises': 'error',
      '@typescript-eslint/no-misused-promises': ['error', { checksVoidReturn: { arguments: false, attributes: false } }],
      '@typescript-eslint/only-throw-error': 'error',
      '@typescript-eslint/restrict-template-expressions': ['error', { allowNumber: true, allowBoolean: true, allowNullish: true }],
      'no-console': ['error', { allow: ['warn', 'error'] }],
      eqeqeq: ['error', 'smart'],
      // Async functions that satisfy a promise-returning interface need no await; Express and
      // pino hand methods around on purpose; String(unknown) shows a user's value as they typed it;
      // an initial value before a try is not a mistake.
      '@typescript-eslint/require-await': 'off',
      '@typescript-eslint/unbound-method': 'off',
      '@typescript-eslint/no-base-to-string': 'off',
      'no-useless-assignment': 'off',
    },
  },
  {
    // The import checks look for control characters in cells on purpose.
    files: ['server/imports/fields.ts'],
    rules: { 'no-control-regex': 'off' },
  },
  {
    files: ['src/**/*.{ts,tsx}'],
    ...reactHooks.configs.flat['recommended-latest'],
    languageOptions: { globals: { ...globals.browser } },
  },
  {
    // The React Compiler's rules: the app is not compiled with it (react-hooks' classic rules stay on).
    files: ['src/**/*.{ts,tsx}'],
    rules: { 'react-hooks/set-state-in-effect': 'off', 'react-hooks/refs': 'off', 'react-hooks/incompatible-library': 'off' },
  },
  {
    // Plain JavaScript (the command's launcher, this file) has no types to check against, and
    // migrations are written against Kysely<any> on purpose (frozen in time, DEVELOPERS.md).
    files: ['**/*.js', 'migrations/**/*.ts'],
    ...tseslint.configs.disableTypeChecked,
  },
  {
    files: ['migrations/**/*.ts'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
  {
    files: ['tests/**/*.{ts,tsx}', 'bench/**/*.ts', 'scripts/**/*.ts', 'server/cli/**/*.ts', 'bin/**/*.js'],
    rules: { 'no-console': 'off' },
  },
  {
    files: ['tests/**/*.{ts,tsx}', 'bench/**/*.ts', 'scripts/**/*.ts'],
    rules: {
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
      '@typescript-eslint/no-non-null-assertion': 'off',
      '@typescript-eslint/unbound-method': 'off',
    },
  },
  ...boundaries.map(({ files, patterns }) => ({ files, rules: { 'no-restricted-imports': ['error', { patterns }] } })),
  {
    files: ['server/**/*.ts'],
    ignores: RAW_SQL_FILES,
    rules: {
      'no-restricted-syntax': [
        'error',
        {
          selector: "CallExpression[callee.property.name='prepare']",
          message: 'Query through Kysely (ctx.db); raw prepared statements are for the files listed in decision record 0012 only.',
        },
      ],
    },
  },
);
