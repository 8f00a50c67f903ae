import type { Config } from 'tailwindcss'

// Forescent's own identity: a deep pine green for trust, warm sand surfaces, an amber "heads-up" accent
// and a clay red kept for problems. Type scale and spacing are tuned for phones first.
export default {
  content: [
    './components/**/*.{vue,ts}',
    './layouts/**/*.vue',
    './pages/**/*.vue',
    './app.vue',
    './error.vue',
    './shared/**/*.ts',
  ],
  // Dark appearance: the `dark` class on <html> (plugins/appearance.client.ts: the phone's setting or the person's
  // choice); the dark values of the palette below are applied in assets/css/dark.css.
  darkMode: 'class',
  theme: {
    extend: {
      // Text colours meet WCAG 2.2 AA (4.5:1) on every surface they are used on (white, sand-50…200, the tinted
      // boxes amber-100, clay-100, pine-50/100): ink-faint ≥ 4.7, amber-700 ≥ 5.3, clay-500 ≥ 4.6 (and white on it
      // 6.0), pine-500 ≥ 4.8, sand-600 ≥ 4.9; checked by the axe-core scan of every page (tests/e2e/tour.spec.ts).
      colors: {
        pine: {
          50: '#eef6f4', 100: '#d5e9e4', 200: '#acd3c9', 300: '#7cb6a8', 400: '#4f9584',
          500: '#2e6b5d', 600: '#276356', 700: '#1f4d45', 800: '#193d37', 900: '#122c28',
        },
        sand: {
          50: '#fbf9f5', 100: '#f5f0e6', 200: '#ebe2d0', 300: '#dccdb0', 400: '#c4ae86',
          500: '#a88f63', 600: '#705d3d', 700: '#66553a', 800: '#453a29', 900: '#2a241a',
        },
        amber: { 100: '#fdf0d2', 300: '#f6cf72', 500: '#e0a21d', 700: '#7a5408' },
        clay: { 100: '#f9e1dc', 300: '#eba597', 500: '#a8432e', 700: '#8f3424' },
        ink: { DEFAULT: '#1d2422', soft: '#4a5653', faint: '#5a6562' },
        // Dark appearance only (assets/css/dark.css): surfaces from darkest to lightest, and the text on them.
        night: {
          950: '#0e1715', 900: '#15211e', 800: '#1c2b27', 700: '#263833', 600: '#344a44', 500: '#4a625b',
          ink: '#e8eeec', soft: '#b8c6c2', faint: '#9aaaa5',
        },
      },
      fontFamily: {
        sans: ['"Inter Variable"', 'system-ui', 'sans-serif'],
      },
      fontSize: {
        // A compact modular scale (ratio ~1.2) with readable line heights on small screens.
        xs: ['0.78rem', { lineHeight: '1.1rem' }],
        sm: ['0.875rem', { lineHeight: '1.3rem' }],
        base: ['1rem', { lineHeight: '1.55rem' }],
        lg: ['1.2rem', { lineHeight: '1.7rem' }],
        xl: ['1.44rem', { lineHeight: '1.9rem' }],
        '2xl': ['1.73rem', { lineHeight: '2.2rem' }],
        '3xl': ['2.07rem', { lineHeight: '2.5rem' }],
      },
      spacing: { 4.5: '1.125rem', 13: '3.25rem', 18: '4.5rem' },
      borderRadius: { card: '0.9rem' },
      boxShadow: { card: '0 1px 2px rgba(18,44,40,.06), 0 4px 14px rgba(18,44,40,.06)' },
    },
  },
  plugins: [],
} satisfies Config
