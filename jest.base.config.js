// Shared jest settings: ts-jest in transpile-only mode (tsconfig.test.json sets isolatedModules);
// types are checked separately by `tsc -p tsconfig.test.json --noEmit` in the lint step.
module.exports = {
  testEnvironment: 'node',
  transform: {
    '^.+\\.tsx?$': ['ts-jest', { tsconfig: '<rootDir>/tsconfig.test.json' }]
  },
  moduleFileExtensions: ['ts', 'js', 'json'],
  rootDir: __dirname,
  passWithNoTests: true
};
