// Package test: build the wheel and install it into a fresh venv with JupyterLab.
const base = require('./jest.base.config');
module.exports = {
  ...base,
  roots: ['<rootDir>/test/package'],
  testMatch: ['**/*.test.ts'],
  testTimeout: 600000,
  maxWorkers: 1
};
