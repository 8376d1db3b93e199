// ESLint flat config: typescript-eslint's recommended rules plus the project's habits
// (curly, eqeqeq, consistent type imports).
import js from '@eslint/js';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  { ignores: ['lib/**', 'lib-core/**', 'node_modules/**', 'perpend/**', '.venv/**', 'test-artifacts/**', '*.config.js'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: {
      globals: { console: 'readonly', process: 'readonly', setTimeout: 'readonly', clearTimeout: 'readonly', URL: 'readonly', Buffer: 'readonly', performance: 'readonly' }
    },
    rules: {
      curly: ['error', 'all'],
      eqeqeq: ['error', 'smart'],
      '@typescript-eslint/consistent-type-imports': ['error', { prefer: 'type-imports', fixStyle: 'inline-type-imports' }],
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-namespace': 'off',
      '@typescript-eslint/no-non-null-assertion': 'off'
    }
  }
);
