import type { Config } from 'tailwindcss';

/** Ebbcast's palette (PRODUCT.md, "Look and feel"). Compartment colours are also used by the charts. */
export const palette = {
  ink: '#1D2433',
  paper: '#F7F4EC',
  accent: '#1F6F78',
  susceptible: '#6E8B3D',
  exposed: '#C8962E',
  infectious: '#C4473A',
  removed: '#4A5A9C',
  vaccinated: '#7A5C99',
  warning: '#B5531C',
} as const;

const config: Config = {
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}', './lib/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        ...palette,
        line: '#D9D3C3',
        panel: '#FFFDF8',
        'accent-dark': '#15525A',
      },
      fontFamily: {
        sans: ['var(--font-text)', 'system-ui', 'sans-serif'],
        mono: ['var(--font-figures)', 'ui-monospace', 'monospace'],
      },
      minHeight: { touch: '44px' },
      minWidth: { touch: '44px' },
    },
  },
};

export default config;
