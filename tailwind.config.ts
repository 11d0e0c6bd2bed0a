import type { Config } from 'tailwindcss';

/** Lamella's own palette: a slate-teal "lamina" scale and an amber caution scale. */
export default {
  content: ['./index.html', './src/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        lamina: {
          50: '#eef7f6',
          100: '#d5ecea',
          200: '#abd8d4',
          300: '#79bdb8',
          400: '#4c9f9a',
          500: '#33837f',
          600: '#276966',
          700: '#215553',
          800: '#1d4544',
          900: '#1a3a3a',
          950: '#0b2122',
        },
        caution: {
          50: '#fff8eb',
          100: '#feeac7',
          500: '#e08a0b',
          700: '#a3560a',
          900: '#6a390e',
        },
      },
      fontFamily: {
        sans: ['Lexend', 'system-ui', 'sans-serif'],
      },
      spacing: {
        gutter: '1.25rem',
      },
    },
  },
} satisfies Config;
