// Lint and format rules: Nuxt's own config (it knows the auto-imports), plus the house style:
// no semicolons, single quotes, two spaces, compact one-line blocks where they read well.
import stylistic from '@stylistic/eslint-plugin'
import withNuxt from './.nuxt/eslint.config.mjs'

export default withNuxt(
  stylistic.configs.customize({ indent: 2, quotes: 'single', semi: false, braceStyle: '1tbs', arrowParens: true }),
  {
    rules: {
      '@stylistic/member-delimiter-style': ['error', { multiline: { delimiter: 'none' }, singleline: { delimiter: 'semi', requireLast: false }, multilineDetection: 'brackets' }],
      '@stylistic/max-statements-per-line': 'off',
    },
  },
)
