import { defineConfig } from '@playwright/test';

// End-to-end tests run against the built app (`node build`) and the tests' own PostgreSQL cluster, in Debian's
// Chromium: Playwright never downloads a browser here. `npm test` sets DATABASE_URL, AUTH_SECRET, the S3_* and the SMTP_* settings.
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
			DATABASE_URL: process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54339/lugline_test',
			// Photos: the tests' S3 fake, which `npm test` starts (scripts/s3-fake.mjs --test).
			S3_ENDPOINT: process.env.S3_ENDPOINT ?? 'http://127.0.0.1:54359',
			S3_REGION: process.env.S3_REGION ?? 'us-east-1',
			S3_BUCKET: process.env.S3_BUCKET ?? 'lugline-photos',
			S3_ACCESS_KEY_ID: process.env.S3_ACCESS_KEY_ID ?? 'S3RVER',
			S3_SECRET_ACCESS_KEY: process.env.S3_SECRET_ACCESS_KEY ?? 'S3RVER',
			// Customer e-mail: always the tests' mail catcher on loopback, which `npm test` starts
			// (scripts/mail-catcher.mjs --test), whatever SMTP_HOST says: tests never mail anyone.
			SMTP_HOST: '127.0.0.1',
			SMTP_PORT: process.env.LUGLINE_TEST_SMTP_PORT ?? '54379',
			SMTP_USER: '',
			SMTP_PASSWORD: '',
			SMTP_SECURE: 'false',
			// A 10 MiB photo plus the multipart framing (adapter-node's default is 512 KB); see scripts/config.mjs.
			BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT ?? String(10 * 1024 * 1024 + 64 * 1024),
			AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true'
		}
	}
});
