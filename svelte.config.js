import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	kit: {
		// SvelteKit's origin check stays on (the default): Auth.js relies on it for CSRF protection of form posts.
		adapter: adapter({ out: 'build' })
	}
};

export default config;
