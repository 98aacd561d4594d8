import type { Config } from 'tailwindcss'

// Torquewright's design tokens: a warm paper ground, graphite ink, and a copper accent.
export default {
  content: [
    './components/**/*.{vue,ts}',
    './layouts/**/*.vue',
    './pages/**/*.vue',
    './app.vue',
    './error.vue',
    './utils/**/*.ts',
  ],
  theme: {
    extend: {
      fontFamily: {
        sans: ['Manrope', 'Manrope Fallback', 'ui-sans-serif', 'system-ui', 'sans-serif'],
      },
      colors: {
        paper: { DEFAULT: '#f5f3ee', deep: '#ebe7de' },
        ink: { DEFAULT: '#1d2230', soft: '#4a5163', faint: '#5f6472' },
        copper: { DEFAULT: '#a0461f', light: '#e7a27c', dark: '#7a3211', wash: '#f8e7dc' },
        spruce: { DEFAULT: '#2f6b5e', light: '#8cc2b4', wash: '#e2f0ec' },
        signal: { DEFAULT: '#ad3024', wash: '#f9e1de' },
        amber: { DEFAULT: '#85600f', wash: '#f7edd4' },
      },
      borderRadius: { card: '0.875rem' },
      boxShadow: { card: '0 1px 0 rgba(29,34,48,0.06), 0 8px 24px -12px rgba(29,34,48,0.18)' },
      fontSize: {
        figure: ['2rem', { lineHeight: '1.1', fontWeight: '800' }],
      },
    },
  },
  plugins: [],
} satisfies Config
