// The local S3-compatible store for photos (s3rver, a dev dependency), on loopback only:
//   node scripts/s3-fake.mjs          the app's: port from S3_ENDPOINT (default 54349), objects in .data/s3
//   node scripts/s3-fake.mjs --test   the tests': port LUGLINE_TEST_S3_PORT (default 54359), .data/s3-test, wiped first
// `npm start` and `npm test` run it as a child process (scripts/setup.mjs, startS3Fake) and wait for its one line
// "s3 fake ready on http://…"; it stops on SIGTERM/SIGINT. Real object storage needs none of this.
import { mkdirSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { s3, s3Fakes } from './config.mjs';

const fake = process.argv.includes('--test') ? s3Fakes.test : s3Fakes.app;
const bucket = s3.bucket;

function fail(message) {
	console.error(`[s3-fake] ${message}`);
	process.exit(1);
}

if (fake.name === 'app') {
	const url = URL.canParse(s3.endpoint) ? new URL(s3.endpoint) : null;
	if (url?.protocol !== 'http:' || !['127.0.0.1', 'localhost'].includes(url.hostname)) {
		fail(`S3_ENDPOINT is ${s3.endpoint}, not a loopback address: that is real storage, not a place for the fake.`);
	}
}
if (!Number.isInteger(fake.port) || fake.port < 1 || fake.port > 65535) fail(`Not a port: ${fake.port}`);

/** s3rver reports a taken port late and vaguely; ask first so the message can say what to do. */
function portFree(port) {
	return new Promise((done) => {
		const probe = createServer();
		probe.once('error', () => done(false));
		probe.listen(port, '127.0.0.1', () => probe.close(() => done(true)));
	});
}
if (!(await portFree(fake.port))) {
	fail(
		`Port ${fake.port} is already taken by another program, so the local S3 fake cannot start. ` +
			(fake.name === 'test'
				? 'Choose a free one with LUGLINE_TEST_S3_PORT=<port>.'
				: 'Choose a free one with S3_ENDPOINT=http://127.0.0.1:<port>, or stop what holds it.')
	);
}

if (fake.fresh) rmSync(fake.dir, { recursive: true, force: true });
mkdirSync(fake.dir, { recursive: true });

const { default: S3rver } = await import('s3rver');
const server = new S3rver({
	address: '127.0.0.1',
	port: fake.port,
	directory: fake.dir,
	silent: true,
	configureBuckets: [{ name: bucket, configs: [] }]
});
try {
	await server.run();
} catch (error) {
	fail(`s3rver did not start on 127.0.0.1:${fake.port}: ${error instanceof Error ? error.message : error}`);
}
console.log(`s3 fake ready on http://127.0.0.1:${fake.port} (bucket ${bucket}, folder ${fake.dir})`);

let stopping = false;
const stop = () => {
	if (stopping) return;
	stopping = true;
	server.close().finally(() => process.exit(0));
	setTimeout(() => process.exit(0), 2000).unref();
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
// The parent went away without a signal (killed): do not linger holding the port.
process.on('disconnect', stop);
