// Integration tests: a real jupyter server and ipykernel from the project's venv, driven from Node.
const base = require('./jest.base.config');
module.exports = {
  ...base,
  roots: ['<rootDir>/test/integration'],
  testMatch: ['**/*.test.ts'],
  testTimeout: 120000,
  maxWorkers: 1
};
