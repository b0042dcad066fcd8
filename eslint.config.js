// Lint rules that hold the project's dependency direction:
//   app -> components -> shared, workers -> shared, server -> shared
const importPlugin = require('eslint-plugin-import');
const tseslint = require('typescript-eslint');

module.exports = [
  { ignores: ['node_modules/**', 'dist/**', '.data/**', '.expo/**', 'test-artifacts/**', 'coverage/**'] },
  {
    files: ['**/*.{ts,tsx}'],
    languageOptions: { parser: tseslint.parser, parserOptions: { ecmaVersion: 'latest', sourceType: 'module', ecmaFeatures: { jsx: true } } },
    plugins: { import: importPlugin },
    settings: { 'import/resolver': { node: { extensions: ['.ts', '.tsx', '.js'] } } },
    rules: {
      'import/no-restricted-paths': [
        'error',
        {
          zones: [
            { target: './shared', from: ['./app', './components', './workers', './server', './scripts', './tests'], message: 'shared/ is pure: it imports nothing from the other folders.' },
            { target: './components', from: ['./app', './server'], message: 'components/ may use shared/ only.' },
            // Workers are started by URL; only their protocol types may be imported.
            { target: './components', from: './workers', except: ['./protocol.ts'], message: 'components/ start workers by URL and import only workers/protocol.ts.' },
            { target: './workers', from: ['./app', './components', './server'], message: 'workers/ call shared/ only.' },
            { target: './server', from: ['./app', './components', './workers'], message: 'server/ uses shared/ only.' },
            { target: './app', from: ['./server', './workers'], message: 'app/ composes components and shared code only.' },
          ],
        },
      ],
    },
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
