// The build's entry (build/index.js; svelte.config.js puts it there and adapter-node's own entry beside it as
// build/server.js). It sets the security headers of src/lib/security-headers.js on every response the HTTP server
// sends, static files included, which SvelteKit's hooks never see; then it starts adapter-node's server unchanged
// (its PORT, HOST, ORIGIN, BODY_SIZE_LIMIT… settings and graceful shutdown).
import http from 'node:http';
import { securityHeaders } from './security-headers.js';

// Served over https (ORIGIN https://…, usually a TLS-terminating proxy in front): browsers are told to keep to https.
const headers = process.env.ORIGIN?.startsWith('https://')
	? { ...securityHeaders, 'strict-transport-security': 'max-age=31536000' }
	: securityHeaders;

const createServer = http.createServer;
http.createServer = function (...args) {
	const server = createServer.apply(this, args);
	// First of the 'request' listeners, so every answer starts with these; a route may still replace one.
	server.prependListener('request', (_request, response) => {
		for (const [name, value] of Object.entries(headers)) response.setHeader(name, value);
	});
	return server;
};

await import('./server.js');
