// Lint that keeps the house standing: the dependency directions of the codebase, no import cycles,
// and the rules of hooks.
//
// TypeScript 7 ships no JavaScript compiler API, so typescript-eslint cannot parse with it; the Babel
// parser strips types without needing one (docs/decisions/0004-lint-with-babel-parser.md).
import babelParser from '@babel/eslint-parser';
import importPlugin from 'eslint-plugin-import';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';

const FEATURES = ['auth', 'reference', 'trials', 'runs', 'coupons', 'bench', 'imports', 'analysis', 'findings', 'wiki', 'admin'];

/** A feature never imports another feature: the app's composition root does the wiring. */
const featureZones = (side) =>
  FEATURES.map((f) => ({
    target: `./${side}/features/${f}`,
    from: `./${side}/features`,
    except: [`./${f}`],
    message: `A feature never imports another feature; compose them in ${side === 'src' ? 'src/app/' : 'server/app.ts'}.`,
  }));

const NODE_MODULES_FORBIDDEN_IN_SHARED = ['fs', 'path', 'os', 'crypto', 'http', 'https', 'child_process', 'url', 'util', 'stream', 'buffer'];

/** shared/ runs in the browser and on the server: no Node or DOM-only modules in its source. */
const SHARED_PURITY = {
  paths: [...NODE_MODULES_FORBIDDEN_IN_SHARED, 'react', 'react-dom', 'express', 'better-sqlite3', 'drizzle-orm'].map((name) => ({
    name,
    message: 'shared/ imports only zod and pure libraries.',
  })),
  patterns: [{ group: ['node:*'], message: 'shared/ uses no Node APIs.' }],
};

/**
 * The domain barrel re-exports the statistics code (jstat, simple-statistics, ml-matrix). The client, and
 * the shared rules it loads, import each domain module by its own path, so sign-in and Bench stay small.
 */
const NO_DOMAIN_BARREL = {
  regex: '(^|/)domain(/index)?$',
  message: 'Import the domain module itself (shared/domain/vacuum), not the barrel, which pulls the statistics libraries into every page.',
};
const CLIENT_LOADED_SHARED = [
  'shared/runs/**/*.ts',
  'shared/coupons/**/*.ts',
  'shared/trials/**/*.ts',
  'shared/schemas/**/*.ts',
  'shared/constants/**/*.ts',
  'shared/*.ts',
];

/**
 * Features whose queries all live in their repo: the service, router and helpers say what happens and
 * the repo how it is stored.
 */
const REPO_ONLY_FEATURES = ['auth', 'admin', 'trials', 'reference', 'coupons', 'runs'];
const QUERIES_IN_THE_REPO = {
  paths: [{ name: 'drizzle-orm', message: "Queries live in the feature's *.repo.ts; call a repo function." }],
  patterns: [{ group: ['**/db/schema/*', '**/db/schema'], message: "Tables are read and written in the feature's *.repo.ts." }],
};

export default [
  { ignores: ['dist/**', 'node_modules/**', 'data/**', 'drizzle/**', 'test-results/**', 'playwright-report/**', 'coverage/**'] },
  {
    files: ['**/*.{ts,tsx,js}'],
    languageOptions: {
      parser: babelParser,
      ecmaVersion: 'latest',
      sourceType: 'module',
      globals: { ...globals.browser, ...globals.node },
      parserOptions: {
        requireConfigFile: false,
        babelOptions: {
          babelrc: false,
          configFile: false,
          presets: [
            ['@babel/preset-typescript', { isTSX: true, allExtensions: true }],
            ['@babel/preset-react', { runtime: 'automatic' }],
          ],
        },
      },
    },
    plugins: { import: importPlugin, 'react-hooks': reactHooks },
    settings: {
      'import/resolver': { node: { extensions: ['.ts', '.tsx', '.js'] } },
      'import/parsers': { '@babel/eslint-parser': ['.ts', '.tsx', '.js'] },
      'import/extensions': ['.ts', '.tsx', '.js'],
    },
    rules: {
      'import/no-restricted-paths': [
        'error',
        {
          zones: [
            { target: './shared', from: './src', message: 'shared/ is pure: it imports nothing from src/.' },
            { target: './shared', from: './server', message: 'shared/ is pure: it imports nothing from server/.' },
            { target: './src', from: './server', message: 'The client never imports the server, not even types.' },
            { target: './server', from: './src', message: 'The server never imports the client.' },
            // server/measurements is the one writer of readings: features call it, it calls no feature.
            { target: './server/measurements', from: './server/features', message: 'server/measurements sits below the features: it imports none of them.' },
            ...['lib', 'components', 'config'].map((dir) => ({
              target: `./src/${dir}`,
              from: ['./src/features', './src/app'],
              message: `src/${dir} is shared by every feature, so it imports no feature and not the app.`,
            })),
            ...featureZones('src'),
            ...featureZones('server'),
          ],
        },
      ],
      'import/no-cycle': ['error', { ignoreExternal: true }],
      'import/no-self-import': 'error',
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'warn',
    },
  },
  {
    // shared/ runs in the browser and on the server: no Node or DOM-only modules in its source.
    files: ['shared/**/*.ts'],
    ignores: ['shared/**/*.test.ts', 'shared/**/*.bench.ts'],
    rules: {
      'no-restricted-imports': ['error', SHARED_PURITY],
      'no-restricted-globals': ['error', 'window', 'document', 'localStorage', 'process', 'Buffer', '__dirname'],
    },
  },
  {
    files: ['src/**/*.{ts,tsx}'],
    ignores: ['**/*.test.{ts,tsx}', '**/*.bench.ts'],
    rules: { 'no-restricted-imports': ['error', { patterns: [NO_DOMAIN_BARREL] }] },
  },
  {
    files: CLIENT_LOADED_SHARED,
    ignores: ['**/*.test.ts', '**/*.bench.ts'],
    rules: { 'no-restricted-imports': ['error', { ...SHARED_PURITY, patterns: [...SHARED_PURITY.patterns, NO_DOMAIN_BARREL] }] },
  },
  {
    files: REPO_ONLY_FEATURES.map((f) => `server/features/${f}/**/*.ts`),
    ignores: ['**/*.repo.ts', '**/*.test.ts', '**/*.seed.ts', '**/*.bench.ts'],
    rules: { 'no-restricted-imports': ['error', QUERIES_IN_THE_REPO] },
  },
];
