// ESLint flat config: typescript-eslint and eslint-plugin-vue, plus import boundaries that say what the
// folder map says — the client never reaches into the server, the engine (server/core) imports nothing
// from Node, Express, Knex or the rest of the server, and shared/ is neither client nor server.
import js from '@eslint/js';
import globals from 'globals';
import tseslint from 'typescript-eslint';
import pluginVue from 'eslint-plugin-vue';

const nodeBuiltins = { regex: '^node:', message: 'Node built-ins are not allowed here.' };
const serverPackages = {
  regex: '^(express|knex|pg|pg-boss|pg-listen|better-sqlite3|pino|pino-http|multer|argon2|jsonwebtoken|nodemailer)(/|$)',
  message: 'Server packages are not allowed here.',
};

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'test-results/**', 'data/**', 'coverage/**', '**/*.d.ts'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...pluginVue.configs['flat/essential'],
  {
    files: ['**/*.vue'],
    languageOptions: { parserOptions: { parser: tseslint.parser } },
  },
  {
    languageOptions: {
      ecmaVersion: 2023,
      sourceType: 'module',
      globals: { ...globals.node, ...globals.browser },
    },
    rules: {
      // Unused names are errors, except deliberate `_`-prefixed ones.
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
      // Bare `catch {}` and empty arrow callbacks are used on purpose (best-effort cleanup).
      'no-empty': ['error', { allowEmptyCatch: true }],
    },
  },
  {
    files: ['client/**/*.{ts,vue}'],
    languageOptions: { globals: { ...globals.browser } },
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [{ regex: '(^|/)server(/|$)', message: 'The client imports types from shared/, never from server/.' }, nodeBuiltins, serverPackages],
        },
      ],
    },
  },
  {
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { regex: '(^|/)(server|client)(/|$)', message: 'shared/ is used by both sides and imports neither.' },
            { regex: '^(vue|naive-ui|pinia|vue-router|konva)(/|$)', message: 'shared/ has no DOM or client packages.' },
            nodeBuiltins,
            serverPackages,
          ],
        },
      ],
    },
  },
  {
    files: ['server/core/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            nodeBuiltins,
            serverPackages,
            {
              regex:
                '^(\\.\\./)+(http|db|auth|waves|picking|studies|floor-plans|orders|imports|mail|audit|users|sites|system|workers|cli|seed|integrations|deps|app|config|routes)(/|$)',
              message: 'The engine imports nothing from the rest of the server.',
            },
          ],
        },
      ],
    },
  },
);
