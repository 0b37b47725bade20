import type { Config } from 'tailwindcss'

/** Crosspoint palette: deep teal ink, warm paper, a copper accent; plot colours live in shared/plot-palette.ts. */
export default {
  content: ['./app/**/*.{vue,ts}'],
  theme: {
    extend: {
      fontFamily: { sans: ['"Public Sans"', 'system-ui', 'sans-serif'] },
      colors: {
        ink: {
          50: '#f1f6f6',
          100: '#dce9ea',
          200: '#b7d1d4',
          300: '#86b0b6',
          400: '#558a92',
          500: '#3a6e77',
          600: '#2c5860',
          700: '#22464d',
          800: '#1a363c',
          900: '#11262b'
        },
        paper: { 50: '#fdfcf9', 100: '#f8f5ee', 200: '#efe9dc' },
        copper: { 200: '#f2cda9', 400: '#d68a4f', 500: '#c0702f', 600: '#9c5824' },
        ok: '#2f7d4f',
        warn: '#a86a00',
        bad: '#b3261e'
      },
      fontSize: { '2xs': ['0.6875rem', '1rem'] }
    }
  },
  plugins: []
} satisfies Config
