import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import importX from 'eslint-plugin-import-x';
import globals from 'globals';

// One lint config for the three roots. The import rule keeps the house shape: shared/ imports
// nothing from src/ or server/, and src/ and server/ never import each other.
export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', '.data/**', 'drizzle/**', 'coverage/**', '.eval-out/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    files: ['**/*.{ts,tsx,js,mjs}'],
    languageOptions: { globals: { ...globals.browser, ...globals.node } },
    plugins: { 'import-x': importX },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'inline-type-imports' }],
      'no-console': ['error', { allow: ['warn', 'error', 'info'] }],
      'import-x/no-restricted-paths': [
        'error',
        {
          zones: [
            { target: './shared', from: './src', message: 'shared/ must not import the client' },
            { target: './shared', from: './server', message: 'shared/ must not import the server' },
            { target: './src', from: './server', message: 'the client must not import the server' },
            { target: './server', from: './src', message: 'the server must not import the client' },
          ],
        },
      ],
    },
  },
  {
    files: ['server/cli/**', 'scripts/**', 'tests/**', 'server/scripts/**', 'bin/**'],
    rules: { 'no-console': 'off' },
  },
);
