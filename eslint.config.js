// Lint rules: typescript-eslint's recommended set, plus the layering rule that
// keeps core/ free of the surfaces and of platform APIs (the compiler enforces
// the same through core/tsconfig.json; this rule gives the clearer message).
import tseslint from 'typescript-eslint';

export default tseslint.config(
  { ignores: ['node_modules/**', 'dist/**', 'out/**', 'test-results/**'] },
  ...tseslint.configs.recommended,
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    files: ['core/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', {
        patterns: [
          { group: ['**/app/**', '../app', '../../app'], message: 'core/ never imports from app/.' },
          { group: ['node:*', 'fs', 'path', 'os', 'child_process', 'electron'], message: 'core/ is platform-free: no Node or Electron APIs.' },
        ],
      }],
      'no-restricted-globals': ['error', 'window', 'document', 'process', 'require', 'Buffer'],
    },
  },
);
