import type { Config } from 'tailwindcss';

/**
 * Lumenbook's look: a paper notebook. Warm paper ground, ink text, ruled hairlines and a single
 * resin-amber accent. Contrast pairs are chosen for WCAG AA on the paper ground: `amber-ink` is the
 * accent for text and focus rings; `amber` is for fills with ink text on top.
 */
export default {
  content: ['./index.html', './src/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        paper: { DEFAULT: '#f7f1e3', deep: '#efe5cf', edge: '#ddd0b3' },
        ink: { DEFAULT: '#24232b', soft: '#4a4854', faint: '#5f5c67' },
        rule: '#c9bb9c',
        amber: { DEFAULT: '#e0a240', light: '#f3d9a6', ink: '#8a4f00' },
        margin: '#b5473a',
        moss: '#3f6b3a',
      },
      fontFamily: {
        serif: ['Literata', 'Georgia', 'serif'],
        mono: ['ui-monospace', 'SFMono-Regular', 'Menlo', 'monospace'],
      },
      boxShadow: { sheet: '0 1px 0 #ddd0b3, 0 8px 24px -16px rgba(36,35,43,0.35)' },
    },
  },
} satisfies Config;
