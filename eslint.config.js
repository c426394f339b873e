// ESLint (flat config): JavaScript and TypeScript recommended rules, Vue's recommended rules for
// single-file components, and no rule that Prettier owns (eslint-config-prettier). Prettier formats
// (`.prettierrc.json`, 120 columns); `max-len` then catches what it cannot wrap.
import js from '@eslint/js'
import tseslint from 'typescript-eslint'
import vue from 'eslint-plugin-vue'
import prettier from 'eslint-config-prettier'

export default tseslint.config(
  { ignores: ['dist/**', 'drizzle/**', 'node_modules/**', 'e2e/output/**', '.test-data/**', '**/*.d.ts'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...vue.configs['flat/recommended'],
  {
    files: ['**/*.vue'],
    languageOptions: { parserOptions: { parser: tseslint.parser, extraFileExtensions: ['.vue'] } },
  },
  prettier,
  {
    // Tests mount small throwaway components beside the one under test.
    files: ['tests/**'],
    rules: { 'vue/one-component-per-file': 'off' },
  },
  {
    rules: {
      // TypeScript checks names (vue-tsc); ESLint's own check does not know the DOM or Node globals.
      'no-undef': 'off',
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' },
      ],
      // Optional props of a typed defineProps are undefined unless given: no default needed.
      'vue/require-default-prop': 'off',
      'max-len': [
        'error',
        {
          code: 120,
          ignoreUrls: true,
          ignoreStrings: true,
          ignoreTemplateLiterals: true,
          ignoreRegExpLiterals: true,
          ignoreComments: false,
        },
      ],
    },
  },
)
