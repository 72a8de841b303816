import { defineConfig } from '@playwright/test';

// Debian's Chromium, never a downloaded browser. The app under test is the production build,
// started by global-setup.ts against its own throwaway PostgreSQL.
export default defineConfig({
	testDir: '.',
	globalSetup: './global-setup.ts',
	fullyParallel: false,
	workers: 1,
	retries: 0,
	timeout: 60_000,
	reporter: [['list']],
	outputDir: '../../test-results',
	use: {
		baseURL: process.env.STIPPLE_E2E_URL,
		trace: 'off',
		launchOptions: {
			executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
			args: [
				'--headless',
				'--no-sandbox',
				'--disable-gpu',
				'--disable-background-networking',
				'--disable-component-update',
				'--disable-sync',
				'--no-first-run'
			]
		}
	},
	projects: [{ name: 'chromium', use: { browserName: 'chromium' } }]
});
