import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

if (process.env.VITEST) {
	// `npm test` sets these; the defaults let one test file run by hand against the test cluster. Set before the
	// SvelteKit plugin reads the environment for $env/dynamic/private.
	process.env.DATABASE_URL ??= 'postgres://postgres@127.0.0.1:54339/lugline_test';
	process.env.AUTH_SECRET ??= 'lugline-test-secret-not-for-production-000000';
}

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	// The palette's vehicle worker is a module worker (`{ type: 'module' }`); the default 'iife' cannot split chunks.
	worker: { format: 'es' },
	test: {
		// Integration tests share one real database, so files run one after another.
		fileParallelism: false,
		// `npm run test:reliability` (LUGLINE_SUITE=reliability): faults, hostile input and load, slower by design.
		...(process.env.LUGLINE_SUITE === 'reliability'
			? { include: ['tests/reliability/**/*.test.ts'], testTimeout: 600_000, hookTimeout: 600_000 }
			: { include: ['src/**/*.test.ts', 'tests/integration/**/*.test.ts'], testTimeout: 20_000, hookTimeout: 30_000 })
	}
});
