// ESLint flat config: Expo's rules plus the fences between layers (STYLE.md): the engine imports no
// UI, server or database code; the client never imports the server or the database; routes stay thin.
const { defineConfig } = require('eslint/config');
const expoConfig = require('eslint-config-expo/flat');

const serverAndDb = ['**/server/**', '@/server/**', '**/db/**', '@/db/**'];

module.exports = defineConfig([
  expoConfig,
  {
    ignores: ['dist/**', 'node_modules/**', 'data/**', 'migrations/**', 'coverage/**', 'tests/e2e/artifacts/**', '.expo/**'],
  },
  {
    files: ['sim/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['react', 'react-native', 'react-native-*', 'expo', 'expo-*', '@tanstack/*'], message: 'The engine is pure TypeScript: no UI imports.' },
            { group: ['express', 'drizzle-orm', 'drizzle-orm/*', '@electric-sql/*', ...serverAndDb, '**/app/**', '**/components/**', '@/components/**', '@/lib/**'], message: 'The engine imports no server, database or client code.' },
          ],
        },
      ],
    },
  },
  {
    files: ['app/**/*.{ts,tsx}', 'components/**/*.{ts,tsx}', 'lib/**/*.{ts,tsx}'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['express', 'drizzle-orm', 'drizzle-orm/*', '@electric-sql/*', 'nodemailer', 'pdfkit', ...serverAndDb], message: 'The client never imports server or database code.' },
          ],
        },
      ],
    },
  },
  {
    files: ['lib/contracts/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        { patterns: [{ group: ['node:*', 'fs', 'path', 'crypto', ...serverAndDb, 'react', 'react-native'], message: 'Contracts are shared with the app: zod and types only.' }] },
      ],
    },
  },
  {
    files: ['**/*.js', 'scripts/**', 'tests/**', 'server/**', 'db/**', 'sim/cli.ts', 'sim/bench/**'],
    languageOptions: { globals: { require: 'readonly', module: 'writable', __dirname: 'readonly', process: 'readonly' } },
  },
]);
