import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	server: { host: '127.0.0.1', strictPort: false },
	// Fonts and images stay files: the CSP allows no data: fonts, and caching works per file.
	build: { assetsInlineLimit: 0 },
	test: {
		expect: { requireAssertions: true },
		projects: [
			{
				extends: './vite.config.ts',
				test: {
					name: 'unit',
					environment: 'node',
					include: ['tests/unit/**/*.test.ts']
				}
			},
			{
				extends: './vite.config.ts',
				test: {
					name: 'integration',
					environment: 'node',
					include: ['tests/integration/**/*.test.ts'],
					globalSetup: ['tests/integration/global-setup.ts'],
					setupFiles: ['tests/integration/setup.ts'],
					fileParallelism: false,
					testTimeout: 30_000,
					hookTimeout: 60_000
				}
			},
			{
				extends: './vite.config.ts',
				test: {
					name: 'system',
					environment: 'node',
					include: ['tests/load/**/*.test.ts', 'tests/fuzz/**/*.test.ts'],
					fileParallelism: false
				}
			}
		]
	}
});
