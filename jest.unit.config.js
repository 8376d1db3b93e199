// Unit tests: the core, bridge parsers, model and panel logic. No server, no browser.
const base = require('./jest.base.config');
module.exports = {
  ...base,
  roots: [
    '<rootDir>/test/core',
    '<rootDir>/test/bridge',
    '<rootDir>/test/model',
    '<rootDir>/test/panel',
    '<rootDir>/test/worker'
  ],
  testMatch: ['**/*.test.ts'],
  // Both cores of the CI machine: the numerical suites are CPU-bound and independent.
  maxWorkers: 2
};
