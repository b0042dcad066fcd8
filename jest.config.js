// Three projects: pure unit tests, API tests against the real PostgreSQL,
// and browser tests against the exported web app. `npm test` runs all three
// after scripts/test.ts has started the database.
const esm = ['lucia', 'oslo', '@lucia-auth', '@oslojs', 'fflate', 'comlink', 'binpackingjs', 'p-limit', 'yocto-queue'];
const transformIgnorePatterns = [`node_modules/(?!(${esm.join('|')})/)`];
const common = {
  testEnvironment: 'node',
  transform: { '^.+\\.[jt]sx?$': 'babel-jest', '^.+\\.mjs$': 'babel-jest' },
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
