import js from '@eslint/js';
import tseslint from 'typescript-eslint';

// The layers (docs/architecture.md): pure domain modules, repositories, services, routes and
// commands, page code. Each block below says what one layer may not import.
const ROLE = {
  repository: '**/*.repository.js',
  service: '**/*.service.js',
  routes: '**/*.routes.js',
  command: '**/*.command.js',
};
const IO = [
  'kysely',
  'better-sqlite3',
  'fastify',
  'fastify-*',
  '@fastify/*',
  'node:fs',
  'node:fs/*',
];
// Type-only imports are erased at build time, so they cross layers freely.
const restrict = (groups, message) => ({
  '@typescript-eslint/no-restricted-imports': [
    'error',
    { patterns: [{ group: groups, message, allowTypeImports: true }] },
  ],
});
const roleFiles = ['**/*.repository.ts', '**/*.service.ts', '**/*.routes.ts', '**/*.command.ts'];
const layerRules = [
  // Broad rule first: a later block's `no-restricted-imports` replaces it for its own files, so
  // every later block repeats the routes and commands patterns.
  {
    files: ['src/**/*.ts', 'data-import/**/*.ts'],
    ignores: [
      'src/server/app.ts',
      'src/auth/security.ts', // registers the auth, set-up and audit routes as one plugin
      'src/cli/commands/**',
      '**/*.routes.ts',
    ],
    rules: restrict(
      [ROLE.routes, ROLE.command],
      'Routes are registered by src/server/app.ts and commands by src/cli/commands/index.ts only.',
    ),
  },
  {
    files: [
      'src/phosphorus/**',
      'src/binders/**',
      'src/chem/**',
      'src/preparation/**',
      'src/{plans,patients,additives,diary,foods,balance}/*.ts',
    ],
    ignores: [
      ...roleFiles,
      '**/*.tables.ts',
      'src/plans/demo-seed.ts', // writes the invented demo patient through the repositories
      'src/plans/plan-settings-source.ts', // reads the clinic settings for the summary
      'src/balance/balance-settings-source.ts', // the same for the balancer
      'src/diary/report-*.ts', // renders the saved report (templates, PDF)
      'src/diary/shared-foods.ts', // the audits' cache of foods read from SQLite
      'src/foods/name-index.ts', // asks SQLite's own FTS5 tokenizer (see its header)
    ],
    rules: restrict(
      [...IO, ROLE.repository, ROLE.service, ROLE.routes, ROLE.command],
      'Domain modules are pure: plain data in, plain data out (docs/architecture.md).',
    ),
  },
  {
    files: ['**/*.repository.ts'],
    rules: restrict(
      [ROLE.service, ROLE.routes, ROLE.command, 'fastify'],
      'A repository holds Kysely code only; services call it, not the other way round.',
    ),
  },
  {
    files: ['**/*.service.ts'],
    rules: restrict(
      [ROLE.routes, ROLE.command, 'fastify'],
      'Services are called by routes and commands and know neither.',
    ),
  },
  {
    files: ['src/web/client/**'],
    rules: restrict(
      [
        ...IO,
        'node:*',
        ROLE.repository,
        ROLE.service,
        ROLE.routes,
        ROLE.command,
        '**/db/*',
        '**/server/*',
      ],
      'Page code runs in the browser: it shares zod schemas and types, never server modules.',
    ),
  },
];

export default tseslint.config(
  {
    ignores: [
      'node_modules/**',
      'db/**',
      'test-artifacts/**',
      'src/web/public/build/**',
      'src/cli/dev-bin.js',
      'dist/**',
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { ecmaVersion: 2023, sourceType: 'module' },
    rules: {
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_' },
      ],
      '@typescript-eslint/no-explicit-any': 'off',
      'no-console': 'error',
    },
  },
  ...layerRules,
  {
    // Files the program reads are found through src/paths.ts: a path relative to the module
    // breaks in the compiled copy under dist/.
    files: ['src/**/*.ts', 'data-import/**/*.ts'],
    ignores: ['src/paths.ts', 'src/web/client/**'],
    rules: {
      'no-restricted-syntax': [
        'error',
        {
          selector:
            "NewExpression[callee.name='URL'] > MemberExpression.arguments[object.type='MetaProperty']",
          message:
            'Find product files with projectPath() from src/paths.ts (works from dist/ too).',
        },
      ],
    },
  },
  {
    files: ['test/**', 'src/cli/**', 'data-import/**', 'src/web/**', 'src/server/serve.ts'],
    rules: { 'no-console': 'off' },
  },
);
