// Three projects: pure unit tests, API tests against the real PostgreSQL,
// and browser tests against the exported web app. `npm test` runs all three
// after scripts/test.ts has started the database.
const esm = ['lucia', 'oslo', '@lucia-auth', '@oslojs', 'fflate', 'comlink', 'binpackingjs'];
const transformIgnorePatterns = [`node_modules/(?!(${esm.join('|')})/)`];
const common = {
  testEnvironment: 'node',
  transform: { '^.+\\.[jt]sx?$': 'babel-jest', '^.+\\.mjs$': 'babel-jest' },
  transformIgnorePatterns,
  moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
  moduleFileExtensions: ['ts', 'tsx', 'js', 'mjs', 'cjs', 'json'],
};
module.exports = {
  projects: [
    { ...common, displayName: 'unit', testMatch: ['<rootDir>/tests/unit/**/*.test.ts'] },
    // Real database and real browser: generous limits, so a busy machine
    // slows these tests down instead of failing them.
    { ...common, displayName: 'api', testMatch: ['<rootDir>/tests/api/**/*.test.ts'], testTimeout: 30_000 },
    { ...common, displayName: 'browser', testMatch: ['<rootDir>/tests/browser/**/*.test.ts'], testTimeout: 180_000 },
  ],
};
