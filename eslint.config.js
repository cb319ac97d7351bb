import js from '@eslint/js';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  {
    ignores: [
      'node_modules/**',
      'db/**',
      'test-artifacts/**',
      'src/web/public/build/**',
      'src/cli/dev-bin.js',
      'dist/**',
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { ecmaVersion: 2023, sourceType: 'module' },
    rules: {
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_' },
      ],
      '@typescript-eslint/no-explicit-any': 'off',
      'no-console': 'error',
    },
  },
  {
    files: ['test/**', 'src/cli/**', 'data-import/**', 'src/web/**', 'src/server/serve.ts'],
    rules: { 'no-console': 'off' },
  },
);
