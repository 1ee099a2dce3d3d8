// ESLint flat config (run by `npm run lint` and `npm run verify`, which point here so that the
// top level keeps only the folders and files the product owner fixed).
//
// - typescript-eslint's type-aware recommended rules (no-floating-promises, no-misused-promises, …);
// - the React hooks rules for islands;
// - an import-cycle rule over the whole tree;
// - the layer boundaries of DEVELOPERS.md ("Layers and import directions"), as no-restricted-imports.
import path from 'node:path';
import { defineConfig } from 'eslint/config';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import { importX, createNodeResolver } from 'eslint-plugin-import-x';

const root = path.resolve(import.meta.dirname, '..');

/** Packages that run only on the server (or in Node), never in the browser or a pure layer. */
const nodeOnly = ['astro:*', 'node:*', 'sequelize', 'pg', 'pg-copy-streams', 'mqtt', 'aedes', 'nodemailer', 'lucia'];

const packages = (group, message) => ({ 'no-restricted-imports': ['error', { patterns: [{ group, message }] }] });

/** A folder (or file) relative to the repository root. */
const at = (...parts) => parts.map((p) => `./${p}`);

const PURE = 'lib/domain and lib/shared are pure: no I/O, no Astro, no server code.';
const SHARED_BELOW_DOMAIN = 'lib/shared is the vocabulary under lib/domain: lib/domain may import lib/shared, never the reverse.';
const CORE = 'lib/core is the worker-safe core: it never imports lib/server, pages, components or lib/client.';
const OUTSIDE_WEB = 'db/, ingest/ and seeds/ run outside the web app: no web services, pages, components or lib/client.';
const ISLANDS = 'Islands and lib/client run in the browser: they import only lib/shared, lib/domain and lib/client.';

/** import-x/no-restricted-paths zones: each import is resolved to a file, then checked. */
const zones = [
  { target: at('src/lib/shared'), from: at('src/lib/domain'), message: SHARED_BELOW_DOMAIN },
  {
    target: at('src/lib/shared', 'src/lib/domain'),
    from: at(
      'src/lib/server',
      'src/lib/core',
      'src/lib/client',
      'src/components',
      'src/pages',
      'src/layouts',
      'src/middleware.ts',
      'db',
      'ingest',
      'seeds',
    ),
    message: PURE,
  },
  {
    target: at('src/lib/core'),
    from: at('src/lib/server', 'src/lib/client', 'src/components', 'src/pages', 'src/layouts', 'src/middleware.ts'),
    message: CORE,
  },
  {
    target: at('db', 'ingest', 'seeds'),
    from: at('src/lib/server/services', 'src/lib/client', 'src/components', 'src/pages', 'src/layouts', 'src/middleware.ts'),
    message: OUTSIDE_WEB,
  },
  {
    target: at('src/components', 'src/lib/client'),
    from: at('src/lib/server', 'src/lib/core', 'src/pages', 'src/middleware.ts', 'db', 'ingest', 'seeds'),
    message: ISLANDS,
  },
];

export default defineConfig(
  { ignores: ['dist/**', 'node_modules/**', '.astro/**', 'var/**', 'test-results/**', 'public/**'] },

  // TypeScript, type-aware.
  {
    files: ['**/*.ts', '**/*.tsx'],
    extends: [tseslint.configs.recommendedTypeChecked],
    languageOptions: { parserOptions: { projectService: true, tsconfigRootDir: root } },
    rules: {
      // `any` is allowed where a value comes straight off the wire or the database and is
      // validated right after; the unsafe-* family would flag every such line.
      '@typescript-eslint/no-explicit-any': 'off',
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/no-non-null-assertion': 'off',
      // Callback props are declared as methods (`onSave(v): void`) and never use `this`.
      '@typescript-eslint/unbound-method': 'off',
      // An async function that implements a Promise-returning contract (a handler's init, an
      // API route, an aedes persistence method) need not await anything.
      '@typescript-eslint/require-await': 'off',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      // Promises: a floating promise loses its error; a promise where a void callback is
      // expected (an event handler, a timer) is never awaited. Fire-and-forget is written `void p`.
      '@typescript-eslint/no-floating-promises': 'error',
      '@typescript-eslint/no-misused-promises': ['error', { checksVoidReturn: { attributes: false } }],
    },
  },
  { files: ['**/*.js', '**/*.mjs'], extends: [tseslint.configs.disableTypeChecked] },

  // Import cycles, anywhere.
  {
    files: ['**/*.ts', '**/*.tsx'],
    plugins: { 'import-x': importX },
    settings: {
      'import-x/extensions': ['.ts', '.tsx', '.js', '.mjs'],
      'import-x/parsers': { '@typescript-eslint/parser': ['.ts', '.tsx'] },
      'import-x/resolver-next': [createNodeResolver({ extensions: ['.ts', '.tsx', '.js', '.mjs', '.d.ts'] })],
    },
    rules: { 'import-x/no-cycle': ['error', { ignoreExternal: true }] },
  },

  // React hooks, for islands.
  {
    files: ['src/components/**/*.tsx'],
    plugins: { 'react-hooks': reactHooks },
    rules: {
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'error',
    },
  },

  // Layer boundaries (DEVELOPERS.md, "Layers and import directions"): folders by resolved path,
  // packages by name. (.astro files are not linted here; `astro check` types them.)
  {
    files: ['**/*.ts', '**/*.tsx'],
    rules: { 'import-x/no-restricted-paths': ['error', { basePath: root, zones }] },
  },
  {
    files: ['src/lib/domain/**/*.ts', 'src/lib/shared/**/*.ts'],
    rules: packages([...nodeOnly, 'astro', 'react', 'react-dom'], PURE),
  },
  {
    files: ['src/lib/core/**/*.ts', 'db/**/*.ts', 'ingest/**/*.ts', 'seeds/**/*.ts'],
    rules: packages(['astro', 'astro:*'], CORE),
  },
  { files: ['src/components/**/*.tsx', 'src/components/**/*.ts', 'src/lib/client/**/*.ts'], rules: packages(nodeOnly, ISLANDS) },

  // TEMPORARY: findings in files that are being rewritten on other branches right now (the
  // worker-safe core, the services, auth, ingest). The integrator fixes them after merging and
  // deletes this block; each entry names the file and the rule, nothing else is relaxed.
  ...[
    ['ingest/broker-main.ts', '@typescript-eslint/no-misused-promises'],
    ['ingest/main.ts', '@typescript-eslint/no-misused-promises'],
    ['ingest/broker.ts', '@typescript-eslint/no-unnecessary-type-assertion'],
    ['ingest/subscriber.ts', '@typescript-eslint/restrict-template-expressions'],
    ['src/lib/core/alarm-config-store.ts', '@typescript-eslint/no-unnecessary-type-assertion'],
    ['src/lib/server/auth.ts', '@typescript-eslint/no-unnecessary-type-assertion'],
    ['src/lib/server/services/spc.ts', '@typescript-eslint/no-unnecessary-type-assertion'],
    ['src/lib/server/services/baths.ts', '@typescript-eslint/no-redundant-type-constituents'],
    ['src/lib/server/services/holds.ts', '@typescript-eslint/no-base-to-string'],
    ['src/lib/server/services/quality.ts', '@typescript-eslint/no-base-to-string'],
    ['src/lib/server/services/trace.ts', '@typescript-eslint/no-base-to-string'],
    // lib/shared/baths.ts re-exports the bath-check computation for services/baths.ts until that
    // file imports it from lib/domain/film/bath-check.ts.
    ['src/lib/shared/baths.ts', 'import-x/no-restricted-paths'],
  ].map(([file, rule]) => ({ files: [file], rules: { [rule]: 'off' } })),
);
