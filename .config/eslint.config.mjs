// @ts-check
// Lint for the whole repository: `npm run lint` (part of `npm test`). Besides the usual TypeScript and Angular rules,
// the `import-x/no-restricted-paths` zones below are the layering DEVELOPERS.md describes, as a check: each zone
// names a folder, what it may not import, and why. `test/lint/` holds one deliberate violation per zone, and
// test/server/lint-rules.test.ts checks that each still fires.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import angular from 'angular-eslint';
import importX, { createNodeResolver } from 'eslint-plugin-import-x';
import prettier from 'eslint-config-prettier';

/** A zone: files under `target` may not import files under any of `from` (repository-relative paths). */
const zone = (target, from, message, except) => ({ target, from, message, ...(except ? { except } : {}) });

export const LAYERING_ZONES = [
  zone(
    './shared',
    ['./server', './simulator', './seeds', './broker', './src', './migrations', './test'],
    'shared/ is pure product code: it imports nothing outside itself.',
  ),
  zone(
    './src',
    ['./server', './simulator', './seeds', './broker', './migrations', './test', './shared/cli', './shared/bench'],
    'The dashboard imports only shared/contracts and pure shared/ modules.',
  ),
  zone(
    './simulator',
    ['./server', './broker', './src', './migrations', './test', './seeds'],
    "The simulator is a field unit: it talks MQTT, never to the server's code.",
  ),
  zone(
    './broker',
    ['./server', './simulator', './seeds', './src', './migrations', './test'],
    'The broker gets authentication injected; it imports only shared/.',
  ),
  // Top-level folders form one direction (shared ← broker, simulator, seeds, migrations ← server ← test; src ← shared):
  // the zones above and these three leave no cycle between folders.
  zone(
    './seeds',
    ['./server', './simulator', './broker', './src', './migrations', './test'],
    "seeds/ is the demo world's data: it gets what it needs from the server passed in, and imports only shared/.",
  ),
  zone(
    './migrations',
    ['./server', './simulator', './seeds', './broker', './src', './test'],
    'Migrations are schema changes only: they import nothing from the product.',
  ),
  zone(
    './server',
    ['./test', './src', './simulator'],
    'The server never imports tests, the dashboard or the simulator (benchmarks and the evaluation live under test/).',
  ),
  zone('./server/routes', ['./server/data'], 'Routes call services; only services reach the repositories in server/data/.'),
  zone(
    './server/health',
    ['./server/data', './server/services', './server/routes', './server/consumers', './broker'],
    'server/health/ is pure (shared by the server and the offline evaluation): no I/O, no services.',
  ),
];

export default tseslint.config(
  { ignores: ['dist/**', '.data/**', '.angular/**', 'node_modules/**', 'coverage/**'] },
  {
    files: ['**/*.ts', '**/*.mjs'],
    extends: [js.configs.recommended, ...tseslint.configs.recommended],
    plugins: { 'import-x': importX },
    settings: { 'import-x/resolver-next': [createNodeResolver({ extensions: ['.ts', '.js', '.mjs'] })] },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
      'import-x/no-restricted-paths': ['error', { zones: LAYERING_ZONES }],
      'no-restricted-imports': 'off',
      // A `let` assigned once, later, but read by closures made before that (stack.ts) is not a const.
      'prefer-const': ['error', { ignoreReadBeforeAssign: true }],
    },
  },
  {
    // The simulator's benchmark starts a broker to publish into: the one simulator file that may.
    files: ['simulator/bench/**/*.ts'],
    rules: { 'import-x/no-restricted-paths': ['error', { zones: LAYERING_ZONES.filter((z) => z.target !== './simulator') }] },
  },
  {
    // Only server/data/ (and the migrations, which are schema changes in Knex's own format) talk SQL.
    files: ['**/*.ts'],
    ignores: ['server/data/**', 'migrations/**', 'seeds/**', 'test/**', 'server/scripts/**'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        { paths: [{ name: 'knex', message: 'Only server/data/ talks to the database: add a repository method there.' }] },
      ],
    },
  },
  {
    files: ['server/services/**/*.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          paths: [
            { name: 'knex', message: 'Only server/data/ talks to the database: add a repository method there.' },
            { name: 'express', message: 'Services know nothing of HTTP: take typed input from the route.' },
            {
              name: 'zod',
              message:
                'Routes validate requests; services take validated, typed input (schemas live in shared/contracts or server/routes).',
            },
          ],
          patterns: [
            {
              group: ['**/data/db'],
              importNames: ['Db', 'createDb'],
              message: 'Services use repositories, not the query builder: add a method in server/data/.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['server/health/**/*.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          paths: ['knex', 'mysql2', 'mqtt', 'aedes', 'ws', 'express', 'node:fs', 'fs', 'node:net', 'node:http'].map((name) => ({
            name,
            message: 'server/health/ is pure: pass data in, get alarms out.',
          })),
        },
      ],
    },
  },
  {
    files: ['src/**/*.ts'],
    extends: [...angular.configs.tsRecommended],
    processor: angular.processInlineTemplates,
  },
  { files: ['src/**/*.html'], extends: [...angular.configs.templateRecommended, ...angular.configs.templateAccessibility] },
  prettier,
);
