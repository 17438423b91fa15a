import type { Config } from 'tailwindcss'

// A calm workshop look: warm neutral paper, one strong accent (a deep teal),
// type shipped with the app.
export default {
  content: ['./app/**/*.{vue,ts}'],
  theme: {
    extend: {
      fontFamily: {
        sans: ['"IBM Plex Sans"', 'system-ui', 'sans-serif'],
        mono: ['"IBM Plex Mono"', 'ui-monospace', 'monospace'],
      },
      colors: {
        paper: { DEFAULT: '#f6f4ef', deep: '#ece8df', line: '#d9d3c7' },
        ink: { DEFAULT: '#23211d', soft: '#5b574f', faint: '#6b665d' },
        accent: { DEFAULT: '#0f6e6a', dark: '#0a4f4c', light: '#d6ecea' },
        caution: { DEFAULT: '#8a5a00', bg: '#fff4d6', line: '#e0b54a' },
        danger: { DEFAULT: '#a3261b', bg: '#fbe7e4' },
        ok: { DEFAULT: '#2f6b2a', bg: '#e5f2e1' },
      },
    },
  },
  plugins: [],
} satisfies Config
