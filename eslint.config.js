// One flat ESLint config for the whole repository. Formatting is Prettier's job, so no
// stylistic rules here. Each override says why it exists.
import js from '@eslint/js';
import pluginVue from 'eslint-plugin-vue';
import globals from 'globals';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'uploads/**', '.data/**', 'db/migrations/**', 'coverage/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...pluginVue.configs['flat/recommended'],
  {
    files: ['**/*.vue'],
    languageOptions: { parserOptions: { parser: tseslint.parser, extraFileExtensions: ['.vue'] } },
  },
  {
    files: ['app/**/*.{ts,vue}'],
    languageOptions: { globals: globals.browser },
  },
  {
    files: ['api/**/*.ts', 'db/**/*.ts', 'tests/**/*.ts', '*.config.ts', '*.config.js'],
    languageOptions: { globals: globals.node },
  },
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'inline-type-imports' }],
      'no-console': ['error', { allow: ['warn', 'error', 'log'] }],
      // Input validation matches control characters on purpose (NUL, C0 controls in text and URLs).
      'no-control-regex': 'off',
    },
  },
  {
    // Vue's template formatting rules fight Prettier; Prettier decides layout.
    files: ['**/*.vue'],
    rules: {
      'vue/max-attributes-per-line': 'off',
      'vue/singleline-html-element-content-newline': 'off',
      'vue/multiline-html-element-content-newline': 'off',
      'vue/html-self-closing': 'off',
      'vue/html-indent': 'off',
      'vue/html-closing-bracket-newline': 'off',
    },
  },
  {
    // The UI never logs except through the notifier (app/composables/notifier.ts).
    files: ['app/**/*.{ts,vue}'],
    ignores: ['app/composables/notifier.ts'],
    rules: { 'no-console': 'error' },
  },
  {
    // Single-word page names are fine for route components: they are never used as tags.
    files: ['app/pages/**/*.vue', 'app/App.vue'],
    rules: { 'vue/multi-word-component-names': 'off' },
  },
);
