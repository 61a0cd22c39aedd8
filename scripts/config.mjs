// The one place where the local run's defaults live. Every script, the knexfile and the app read
// their settings from the environment; these are the values used when a variable is not set.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
export const dataDir = process.env.LUGLINE_DATA_DIR ? resolve(process.env.LUGLINE_DATA_DIR) : join(root, '.data');

/** The private PostgreSQL clusters: one for the app and `npm run dev`, one that only the tests use. */
export const clusters = {
	app: {
		name: 'app',
		dir: join(dataDir, 'pg'),
		port: Number(process.env.LUGLINE_PG_PORT ?? 54329),
		database: process.env.LUGLINE_PG_DATABASE ?? 'lugline'
	},
	test: {
		name: 'test',
		dir: join(dataDir, 'pg-test'),
		port: Number(process.env.LUGLINE_TEST_PG_PORT ?? 54339),
		database: 'lugline_test'
	}
};

export function databaseUrl(cluster, database = cluster.database) {
	return `postgres://postgres@127.0.0.1:${cluster.port}/${database}`;
}

/** Where the app finds its database: DATABASE_URL when set (production), else the local cluster. */
export function appDatabaseUrl() {
	return process.env.DATABASE_URL ?? databaseUrl(clusters.app);
}

/**
 * AUTH_SECRET signs the session cookies. The local run keeps a generated one in the data folder so
 * sessions survive a restart; production sets its own.
 */
export function authSecret() {
	if (process.env.AUTH_SECRET) return process.env.AUTH_SECRET;
	const file = join(dataDir, 'auth-secret');
	if (!existsSync(file)) {
		mkdirSync(dirname(file), { recursive: true });
		writeFileSync(file, randomBytes(32).toString('base64url'), { mode: 0o600 });
	}
	return readFileSync(file, 'utf8').trim();
}

export const host = process.env.HOST ?? '127.0.0.1';
export const port = Number(process.env.PORT ?? 3000);
export const origin = process.env.ORIGIN ?? `http://${host}:${port}`;

/**
 * Photo storage: any S3-compatible object store. The defaults point at the local fake (s3rver) that `npm start`
 * runs from `.data/s3`; set S3_ENDPOINT (and the rest) to use real storage, and `npm start` leaves the fake alone.
 */
export const localS3Endpoint = 'http://127.0.0.1:54349';
export const s3 = {
	endpoint: process.env.S3_ENDPOINT ?? localS3Endpoint,
	region: process.env.S3_REGION ?? 'us-east-1',
	bucket: process.env.S3_BUCKET ?? 'lugline-photos',
	// s3rver only accepts this key pair.
	accessKeyId: process.env.S3_ACCESS_KEY_ID ?? 'S3RVER',
	secretAccessKey: process.env.S3_SECRET_ACCESS_KEY ?? 'S3RVER'
};

function portOf(endpoint) {
	try {
		return Number(new URL(endpoint).port || 54349);
	} catch {
		return NaN; // not a URL: the app's config check says so when it starts
	}
}

/** The local S3 fakes: one for `npm start`, one that only the tests use (wiped at the start of each run). */
export const s3Fakes = {
	app: { name: 'app', port: portOf(s3.endpoint), dir: join(dataDir, 's3'), fresh: false },
	test: {
		name: 'test',
		port: Number(process.env.LUGLINE_TEST_S3_PORT ?? 54359),
		dir: join(dataDir, 's3-test'),
		fresh: true
	}
};

/** The S3_* variables the app reads, for a fake on 127.0.0.1:<port>. */
export function fakeS3Env(fake) {
	return {
		S3_ENDPOINT: `http://127.0.0.1:${fake.port}`,
		S3_REGION: s3.region,
		S3_BUCKET: s3.bucket,
		S3_ACCESS_KEY_ID: 'S3RVER',
		S3_SECRET_ACCESS_KEY: 'S3RVER'
	};
}

/** The S3_* variables for the app as configured (the local fake unless S3_ENDPOINT says otherwise). */
export function s3Env() {
	return {
		S3_ENDPOINT: s3.endpoint,
		S3_REGION: s3.region,
		S3_BUCKET: s3.bucket,
		S3_ACCESS_KEY_ID: s3.accessKeyId,
		S3_SECRET_ACCESS_KEY: s3.secretAccessKey
	};
}

/**
 * adapter-node refuses request bodies over BODY_SIZE_LIMIT (512 KB by default). A photo may be 10 MiB
 * (src/lib/server/photos.ts), so allow that plus room for the multipart framing and the `kind` field.
 */
export const bodySizeLimit = process.env.BODY_SIZE_LIMIT ?? String(10 * 1024 * 1024 + 64 * 1024);

/**
 * Customer e-mail: the app sends real SMTP (nodemailer). The defaults point at the local catcher that `npm start`
 * runs (scripts/mail-catcher.mjs, messages kept in .data/mail); set SMTP_HOST (and the rest) to use a real mail
 * service, and `npm start` leaves the catcher alone.
 */
export const localSmtpHost = '127.0.0.1';
export const localSmtpPort = 54369;
export const smtp = {
	host: process.env.SMTP_HOST ?? localSmtpHost,
	port: Number(process.env.SMTP_PORT ?? localSmtpPort),
	// Empty: no authentication (the catcher takes none).
	user: process.env.SMTP_USER ?? '',
	password: process.env.SMTP_PASSWORD ?? '',
	secure: process.env.SMTP_SECURE ?? 'false',
	from: process.env.MAIL_FROM ?? 'Lugline (demo) <notices@demo.lugline.test>'
};

/** Whether the app's mail goes to the local catcher (SMTP_HOST at its default), so `npm start` should run one. */
export const smtpIsLocal = smtp.host === localSmtpHost;

/** The local SMTP catchers: one for `npm start`, one that only the tests use (wiped at the start of each run). */
export const mailCatchers = {
	app: { name: 'app', port: smtp.port, dir: join(dataDir, 'mail'), fresh: false },
	test: {
		name: 'test',
		port: Number(process.env.LUGLINE_TEST_SMTP_PORT ?? 54379),
		dir: join(dataDir, 'mail-test'),
		fresh: true
	}
};

/** The SMTP_* / MAIL_* variables the app reads, as configured (the local catcher unless SMTP_HOST says otherwise). */
export function smtpEnv() {
	return {
		SMTP_HOST: smtp.host,
		SMTP_PORT: String(smtp.port),
		SMTP_USER: smtp.user,
		SMTP_PASSWORD: smtp.password,
		SMTP_SECURE: smtp.secure,
		MAIL_FROM: smtp.from,
		// Only where the local catcher keeps what it receives; /manage/outbox says so.
		...(smtpIsLocal ? { MAIL_CAPTURE_DIR: mailCatchers.app.dir } : {})
		// The sender loop's settings (MAIL_POLL_MS, MAIL_BATCH, MAIL_MAX_ATTEMPTS, MAIL_RETRY_BASE_MS,
		// MAIL_RETRY_MAX_MS) are read only by the app: their defaults are in src/lib/server/config.ts, and a value set
		// in the environment reaches the app unchanged.
	};
}

/** The variables for an app that sends to a catcher on 127.0.0.1:<port> (the tests'), without credentials. */
export function catcherSmtpEnv(catcher) {
	return {
		SMTP_HOST: localSmtpHost,
		SMTP_PORT: String(catcher.port),
		SMTP_USER: '',
		SMTP_PASSWORD: '',
		SMTP_SECURE: 'false',
		MAIL_FROM: smtp.from,
		MAIL_CAPTURE_DIR: catcher.dir
	};
}
