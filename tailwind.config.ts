import type { Config } from 'tailwindcss';

// Stipple's palette. Every colour is a CSS variable set in src/app.css, so light and dark
// themes swap values without a second class on every element.
const colour = (name: string) => `var(--st-${name})`;

export default {
	content: ['./src/**/*.{html,svelte,ts}'],
	theme: {
		extend: {
			colors: {
				paper: colour('paper'),
				sheet: colour('sheet'),
				well: colour('well'),
				ink: colour('ink'),
				muted: colour('muted'),
				rule: colour('rule'),
				verdigris: {
					DEFAULT: colour('verdigris'),
					strong: colour('verdigris-strong'),
					soft: colour('verdigris-soft'),
					ink: colour('verdigris-ink')
				},
				amber: { DEFAULT: colour('amber'), soft: colour('amber-soft') },
				brick: { DEFAULT: colour('brick'), soft: colour('brick-soft') },
				focus: colour('focus')
			},
			fontFamily: {
				sans: ['"Atkinson Hyperlegible Next Variable"', 'system-ui', 'sans-serif'],
				mono: ['"JetBrains Mono Variable"', 'ui-monospace', 'monospace']
			},
			fontSize: {
				// One step larger than the usual defaults: read at arm's length on a tablet.
				base: ['1.0625rem', { lineHeight: '1.6rem' }]
			},
			spacing: {
				touch: '3rem'
			},
			minHeight: { touch: '3rem' },
			minWidth: { touch: '3rem' },
			borderRadius: { chip: '0.375rem', card: '0.75rem' },
			boxShadow: {
				card: '0 1px 0 var(--st-rule), 0 8px 24px -16px var(--st-shadow)'
			}
		}
	}
} satisfies Config;
