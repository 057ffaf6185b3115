/** @type {import('tailwindcss').Config} */
import defaultTheme from 'tailwindcss/defaultTheme';

export default {
  content: ['./src/**/*.{astro,html,js,jsx,ts,tsx,md}'],
  theme: {
    extend: {
      fontFamily: {
        sans: ['"Inter Variable"', ...defaultTheme.fontFamily.sans],
      },
      colors: {
        // Warm timber: cedar heartwood to sawdust.
        timber: {
          50: '#fbf7f1',
          100: '#f4eadb',
          200: '#e8d3b5',
          300: '#d9b487',
          400: '#c8915c',
          500: '#b5743c',
          600: '#9a5c2f',
          700: '#7c4728',
          800: '#5f3722',
          900: '#3f2517',
        },
        // Galvanized steel: hot-dip grey with a cold blue cast.
        galv: {
          50: '#f4f6f7',
          100: '#e4e9ec',
          200: '#cbd4da',
          300: '#a6b4bd',
          400: '#7b8e9a',
          500: '#5e717e',
          600: '#4b5b66',
          700: '#3e4a53',
          800: '#343e45',
          900: '#1f262b',
        },
        moss: { 100: '#e3efd9', 600: '#4f7a32', 700: '#3e6127' },
        rust: { 100: '#f8e1d9', 600: '#b4441f', 700: '#8f3418' },
      },
    },
  },
  plugins: [],
};
