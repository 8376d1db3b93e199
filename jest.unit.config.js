// Unit tests: the core, bridge parsers, model and panel logic, and the server extension's switch
// (in the .venv's Python). No running server, no browser.
const base = require('./jest.base.config');
module.exports = {
  ...base,
  roots: [
    '<rootDir>/test/core',
    '<rootDir>/test/bridge',
    '<rootDir>/test/model',
    '<rootDir>/test/panel',
    '<rootDir>/test/worker',
    '<rootDir>/test/server'
  ],
  testMatch: ['**/*.test.ts'],
  // Both cores of the CI machine: the numerical suites are CPU-bound and independent.
  maxWorkers: 2
};
