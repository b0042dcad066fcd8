// Three projects: pure unit tests, API tests against the real PostgreSQL,
// and browser tests against the exported web app. `npm test` runs all three
// after scripts/test.ts has started the database.
const { createHash } = require('node:crypto');
const { readFileSync } = require('node:fs');

const esm = ['lucia', 'oslo', '@lucia-auth', '@oslojs', 'fflate', 'comlink', 'binpackingjs', 'p-limit', 'yocto-queue'];
const transformIgnorePatterns = [`node_modules/(?!(${esm.join('|')})/)`];
// The plugin's own text is in its options, so jest's transform cache is renewed when the plugin changes.
const localGlobalsFile = require.resolve('./tests/helpers/localGlobals.js');
const localGlobals = [localGlobalsFile, { version: createHash('sha256').update(readFileSync(localGlobalsFile)).digest('hex').slice(0, 16) }];
const common = {
  testEnvironment: 'node',
  // The project's modules read the built-in globals once each (tests/helpers/localGlobals.js: jest's globals are slow).
  transform: { '^.+\\.[jt]sx?$': ['babel-jest', { plugins: [localGlobals] }], '^.+\\.mjs$': 'babel-jest' },
  transformIgnorePatterns,
  moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
  moduleFileExtensions: ['ts', 'tsx', 'js', 'mjs', 'cjs', 'json'],
};
module.exports = {
  // Real database and real browser: a generous limit, so a busy machine slows
  // the tests down instead of failing them (browser files set their own).
  testTimeout: 30_000,
  projects: [
    { ...common, displayName: 'unit', testMatch: ['<rootDir>/tests/unit/**/*.test.ts'] },
    { ...common, displayName: 'api', testMatch: ['<rootDir>/tests/api/**/*.test.ts'] },
    { ...common, displayName: 'browser', testMatch: ['<rootDir>/tests/browser/**/*.test.ts'], setupFilesAfterEnv: ['<rootDir>/tests/helpers/browserRetry.ts'] },
  ],
};
