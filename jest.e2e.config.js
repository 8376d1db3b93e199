// Browser tests: one real `jupyter lab` and one headless Debian chromium shared by all files,
// run serially (globalSetup starts them, globalTeardown stops them by PID).
const base = require('./jest.base.config');
module.exports = {
  ...base,
  roots: ['<rootDir>/test/e2e'],
  testMatch: ['**/*.test.ts'],
  testTimeout: 180000,
  maxWorkers: 1,
  globalSetup: '<rootDir>/test/e2e/global-setup.ts',
  globalTeardown: '<rootDir>/test/e2e/global-teardown.ts'
};
