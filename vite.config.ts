import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	test: {
		// Integration tests share one real database, so files run one after another.
		fileParallelism: false,
		include: ['src/**/*.test.ts', 'tests/integration/**/*.test.ts'],
		testTimeout: 20_000,
		hookTimeout: 30_000
	}
});
