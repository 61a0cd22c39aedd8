// `npm run start:instance -- --port 3001`: one more app instance from the existing build, against the same
// database as `npm start`, to try the floor with two instances on one machine. Run `npm start` first (it sets up
// the database and builds); then open http://127.0.0.1:3000 and http://127.0.0.1:3001 side by side.
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { appDatabaseUrl, authSecret, bodySizeLimit, clusters, host, root, s3Env, smtpEnv } from './config.mjs';
import { fail, log, serve, startCluster } from './setup.mjs';

const flag = process.argv.indexOf('--port');
const port = Number(flag > 0 ? process.argv[flag + 1] : (process.env.PORT ?? 3001));
if (!Number.isInteger(port) || port < 1 || port > 65535) fail('Give a port: npm run start:instance -- --port 3001');
if (!existsSync(join(root, 'build', 'index.js'))) fail('There is no build yet: run npm start once first.');
if (!process.env.DATABASE_URL) await startCluster(clusters.app);

const origin = process.env.ORIGIN_INSTANCE ?? `http://${host}:${port}`;
log(`second instance at ${origin} (same database, photo storage, mail and AUTH_SECRET; no migrations run here)`);
serve(process.execPath, ['build'], {
	HOST: host,
	PORT: String(port),
	ORIGIN: origin,
	AUTH_SECRET: authSecret(),
	DATABASE_URL: appDatabaseUrl(),
	// The same photo storage as `npm start` (its local S3 fake, unless S3_ENDPOINT names other storage).
	...s3Env(),
	// The same mail settings (the catcher `npm start` runs, unless SMTP_HOST names a mail service); either instance
	// may send a notice, never both.
	...smtpEnv(),
	BODY_SIZE_LIMIT: bodySizeLimit,
	AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true'
});
