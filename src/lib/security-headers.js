// The security headers of every response: pages, API answers, photos and the static files alike. Plain JavaScript
// because two places read it: svelte.config.js (the pages' Content-Security-Policy, which SvelteKit completes with a
// per-response nonce for its own inline scripts) and the server entry the build wraps around adapter-node's
// (scripts/server-entry.js), which sets these on every response before anything else runs.

/**
 * Only the app's own origin: scripts, styles, fonts, images, the palette's worker and every fetch and stream.
 * Styles also allow inline `style` attributes and the `<style>` elements Svelte's transitions add (no nonce can
 * cover those); no inline or foreign script runs.
 */
export const cspDirectives = {
	'default-src': ['self'],
	'script-src': ['self'],
	'style-src': ['self', 'unsafe-inline'],
	'img-src': ['self', 'blob:'],
	'font-src': ['self'],
	'connect-src': ['self'],
	'worker-src': ['self'],
	'object-src': ['none'],
	'base-uri': ['self'],
	'form-action': ['self'],
	'frame-ancestors': ['none']
};

const keywords = new Set(['self', 'none', 'unsafe-inline', 'unsafe-eval', 'strict-dynamic']);

/** The policy as a header value (for everything that is not a page). */
export function cspHeader(directives = cspDirectives) {
	return Object.entries(directives)
		.map(([name, values]) => [name, ...values.map((v) => (keywords.has(v) ? `'${v}'` : v))].join(' '))
		.join('; ');
}

/** Set on every response; a route may replace one (a photo answers with a stricter sandboxing policy). */
export const securityHeaders = {
	'x-content-type-options': 'nosniff',
	'content-security-policy': cspHeader(),
	'referrer-policy': 'same-origin',
	'x-frame-options': 'DENY',
	'cross-origin-opener-policy': 'same-origin',
	'cross-origin-resource-policy': 'same-origin',
	// The bay screen takes photos through a file input, which needs no permission; nothing else is wanted.
	'permissions-policy': 'camera=(), microphone=(), geolocation=(), payment=(), usb=()'
};
