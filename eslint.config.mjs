// Lint and format rules: Nuxt's own config (it knows the auto-imports), plus the house style:
// no semicolons, single quotes, two spaces, compact one-line blocks where they read well.
import stylistic from '@stylistic/eslint-plugin'
import withNuxt from './.nuxt/eslint.config.mjs'

const DOMAINS = 'server/{artworks,review,robots,jobs,films,people,auth,history,policy}/**'

export default withNuxt(
  stylistic.configs.customize({ indent: 2, quotes: 'single', semi: false, braceStyle: '1tbs', arrowParens: true }),
  {
    name: 'decalwright/style',
    rules: {
      // `{ id: number; name: string }` on one line, no delimiters across lines.
      '@stylistic/member-delimiter-style': ['error', { multiline: { delimiter: 'none' }, singleline: { delimiter: 'semi', requireLast: false }, multilineDetection: 'brackets' }],
      '@stylistic/quotes': ['error', 'single', { avoidEscape: true, allowTemplateLiterals: 'always' }],
      // Short statements share a line (`if (a) { b++; c = d }`, `} catch { return null }`).
      '@stylistic/max-statements-per-line': 'off',
      '@stylistic/brace-style': 'off',
      '@stylistic/multiline-ternary': 'off',
      '@stylistic/quote-props': 'off',
      '@stylistic/operator-linebreak': ['error', 'before', { overrides: { '=': 'ignore' } }],
      // Optional props typed in TypeScript are undefined when not given; that is their default.
      'vue/require-default-prop': 'off',
    },
  },
  {
    name: 'decalwright/services-take-their-database',
    files: [DOMAINS],
    rules: {
      'no-restricted-imports': ['error', {
        patterns: [{
          group: ['**/platform/db'],
          importNames: ['useDb'],
          message: 'Queries and services use the database or transaction they are given; only routes call useDb().',
        }],
      }],
    },
  },
  {
    name: 'decalwright/any-where-it-is-the-convention',
    // Kysely's migrations are typed Kysely<any> (the schema changes under them); tests read JSON answers.
    files: ['server/db/migrations/**', 'tests/**'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
  {
    name: 'decalwright/pipeline-and-cut-sheet-house-style',
    // These folders separate single-line members with commas and keep a few long-standing
    // forms; they are being reworked, and follow the rest once that work lands.
    files: [
      'server/pipeline/**', 'server/cutsheet/**', 'shared/utils/sheet-layout.ts', 'shared/utils/settings.ts', 'shared/types/pipeline.ts',
      'tests/unit/pipeline/**', 'tests/unit/cutsheet/**',
    ],
    rules: {
      '@stylistic/member-delimiter-style': 'off',
      '@stylistic/quotes': 'off',
      'import/first': 'off',
      '@typescript-eslint/no-useless-constructor': 'off',
    },
  },
)
