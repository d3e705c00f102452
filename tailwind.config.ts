import type { Config } from 'tailwindcss';

/**
 * Oscillab's design tokens. Components use these names (bg-paper, text-ink, bg-verdict-within …),
 * never raw colour classes. Verdict colours pass WCAG 2.1 AA for text on their own background.
 */
const config: Config = {
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        paper: { DEFAULT: '#fbfaf6', sunk: '#f3f1ea', raised: '#ffffff' },
        ink: { DEFAULT: '#1d2530', soft: '#4a5361', faint: '#6b7280' },
        rule: { DEFAULT: '#d9d5c8', strong: '#b5ae9c' },
        accent: { DEFAULT: '#1f5f74', strong: '#174a5b', soft: '#e3eff2' },
        danger: { DEFAULT: '#a3261c', soft: '#fbe9e7' },
        verdict: {
          within: '#1d6a3b',
          'within-bg': '#e5f2e9',
          partial: '#7d4e00',
          'partial-bg': '#fcf1d8',
          outside: '#a3261c',
          'outside-bg': '#fbe9e7',
          unchecked: '#4a5361',
          'unchecked-bg': '#eceef1',
        },
        hazard: { DEFAULT: '#6e3d00', bg: '#fff4dc', rule: '#d9a441' },
      },
      fontFamily: {
        sans: ['var(--font-text)', 'system-ui', 'sans-serif'],
        mono: ['var(--font-figures)', 'ui-monospace', 'monospace'],
      },
      fontSize: { xs: ['0.75rem', '1.1rem'], sm: ['0.8125rem', '1.25rem'], base: ['0.9375rem', '1.5rem'] },
      borderRadius: { card: '0.375rem' },
      boxShadow: { card: '0 1px 0 rgba(29,37,48,0.06), 0 1px 3px rgba(29,37,48,0.06)' },
    },
  },
};

export default config;
