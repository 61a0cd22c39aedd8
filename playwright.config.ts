import { defineConfig } from '@playwright/test';

// End-to-end tests run against the built app (`node build`) and the tests' own PostgreSQL cluster, in Debian's
// Chromium: Playwright never downloads a browser here. `npm test` sets DATABASE_URL and AUTH_SECRET.
const port = Number(process.env.E2E_PORT ?? 3100);
const baseURL = `http://127.0.0.1:${port}`;

export default defineConfig({
	testDir: 'tests/e2e',
	testMatch: '**/*.test.ts',
	// One worker: the outage project stops the shared test database, and there are only two cores.
	workers: 1,
	fullyParallel: false,
	retries: 0,
	timeout: 30_000,
	expect: { timeout: 5_000 },
	use: {
		baseURL,
		launchOptions: {
			executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
			args: [
				'--headless',
				'--no-sandbox',
				'--disable-gpu',
				'--disable-quic',
				'--no-first-run',
				'--disable-background-networking',
				'--disable-component-update',
				'--disable-sync'
			]
		}
	},
	projects: [
		{ name: 'app', testIgnore: '**/outage.test.ts' },
		// Stops and restarts the database, so it runs after everything else.
		{ name: 'outage', testMatch: '**/outage.test.ts', dependencies: ['app'] }
	],
	webServer: {
		command: 'node build',
		url: `${baseURL}/api/health`,
		reuseExistingServer: false,
		timeout: 60_000,
		stdout: 'ignore',
		stderr: 'pipe',
		env: {
			HOST: '127.0.0.1',
			PORT: String(port),
			ORIGIN: baseURL,
			AUTH_SECRET: process.env.AUTH_SECRET ?? 'lugline-test-secret-not-for-production-000000',
			DATABASE_URL: process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54339/lugline_test'
		}
	}
});
