import { copyFileSync, renameSync } from 'node:fs';
import { join } from 'node:path';
import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';
import { cspDirectives } from './src/lib/security-headers.js';

const out = 'build';
const node = adapter({ out });

/**
 * adapter-node, then our entry in front of its own (scripts/server-entry.js): the security headers reach every
 * response, static files included, and `node build` still starts the app.
 */
const nodeWithHeaders = {
	...node,
	name: 'adapter-node (with security headers)',
	async adapt(builder) {
		await node.adapt(builder);
		renameSync(join(out, 'index.js'), join(out, 'server.js'));
		copyFileSync('scripts/server-entry.js', join(out, 'index.js'));
		copyFileSync('src/lib/security-headers.js', join(out, 'security-headers.js'));
	}
};

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	kit: {
		adapter: nodeWithHeaders,
		// The origin check is done once, in hooks.server.ts (`guard`), for every POST, PUT, PATCH and DELETE whatever
		// its content type, and answers in the app's error shape; SvelteKit's own check (form content types only)
		// would answer first, in another shape. Removing the guard would leave the app open: the reliability suite's
		// cross-site tests (tests/reliability/hostile.test.ts) would fail.
		csrf: { trustedOrigins: ['*'] },
		// Pages: the app's own origin only, plus a per-response nonce for SvelteKit's inline start-up script and
		// the theme script in app.html.
		csp: { mode: 'auto', directives: cspDirectives }
	}
};

export default config;
