// Lint rules that hold the project's dependency direction:
//   app -> components -> shared, workers -> shared, server -> shared
// and, inside the server, http -> services -> db (never back).
// Imports through the `@/` alias are resolved by the TypeScript resolver (the
// paths in tsconfig.json), so an alias is no way around the zones.
const importPlugin = require('eslint-plugin-import');
const reactHooks = require('eslint-plugin-react-hooks');
const tseslint = require('typescript-eslint');

module.exports = [
  { ignores: ['node_modules/**', 'dist/**', '.data/**', '.expo/**', 'test-artifacts/**', 'coverage/**'] },
  // typescript-eslint's recommended rules (syntax only: no type information).
  ...tseslint.configs.recommended.map((config) => ({ ...config, files: ['**/*.{ts,tsx}'] })),
  {
    files: ['**/*.{ts,tsx}'],
    languageOptions: { parser: tseslint.parser, parserOptions: { ecmaVersion: 'latest', sourceType: 'module', ecmaFeatures: { jsx: true } } },
    plugins: { import: importPlugin, 'react-hooks': reactHooks },
    settings: {
      'import/resolver': {
        typescript: { project: './tsconfig.json', alwaysTryTypes: true },
        node: { extensions: ['.ts', '.tsx', '.js'] },
      },
    },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_', ignoreRestSiblings: true }],
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'error',
      'import/no-restricted-paths': [
        'error',
        {
          zones: [
            { target: './shared', from: ['./app', './components', './workers', './server', './scripts', './tests'], message: 'shared/ is pure: it imports nothing from the other folders.' },
            { target: './components', from: ['./app', './server'], message: 'components/ may use shared/ only.' },
            // Workers are started by URL; only their protocol types may be imported.
            { target: './components', from: './workers', except: ['./protocol.ts', './mesh.protocol.ts'], message: 'components/ start workers by URL and import only the workers\' protocol files (workers/protocol.ts, workers/mesh.protocol.ts).' },
            { target: './workers', from: ['./app', './components', './server'], message: 'workers/ call shared/ only.' },
            { target: './server', from: ['./app', './components', './workers'], message: 'server/ uses shared/ only.' },
            { target: './app', from: ['./server', './workers'], message: 'app/ composes components and shared code only.' },
            // The server's layers: http -> services -> db.
            { target: './server/services', from: './server/http', message: 'services never import the http layer: routes validate and hand services typed input.' },
            { target: './server/db', from: './server/services', except: [], message: 'the db layer never imports services.' },
          ],
        },
      ],
    },
  },
  {
    // The demo seeder drives the services to build a realistic lab, so it is
    // the one file under server/db that may import them.
    files: ['server/db/seeders/**/*.ts'],
    rules: {
      'import/no-restricted-paths': 'off',
    },
  },
  {
    // Tests read response bodies as supertest and the browser give them
    // (untyped JSON) and check their shape with assertions.
    files: ['tests/**/*.ts'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
  {
    // shared/ runs in the browser, in workers and on the server alike.
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['react', 'react-native', 'react-native-*', 'three', 'three/*', '@react-three/*', 'express', 'sequelize', 'pg', 'node:*', 'fs', 'path', 'crypto', 'worker_threads', 'child_process'], message: 'shared/ stays free of UI, server and Node-only modules.' },
          ],
        },
      ],
      'no-restricted-globals': ['error', { name: 'process', message: 'shared/ must not read the process environment.' }, { name: 'Buffer', message: 'use Uint8Array in shared/.' }, { name: 'window', message: 'shared/ has no DOM.' }, { name: 'document', message: 'shared/ has no DOM.' }],
    },
  },
];
