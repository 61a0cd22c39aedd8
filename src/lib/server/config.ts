// The server's settings, read once from the environment and checked, so a missing secret fails loudly at start-up
// instead of as a 500 on the first request.
import { env } from '$env/dynamic/private';
import { z } from 'zod';

const flag = (name: string) =>
	z
		.enum(['true', 'false', '1', '0', ''], { error: `${name} must be true or false` })
		.transform((v) => v === 'true' || v === '1');

/** `Name <address>` or a bare address; the name may hold parentheses (`Lugline (demo)`), which we keep. */
const sender = z
	.string()
	.trim()
	.transform((value, ctx) => {
		const match = /^(?:"?([^"<>\r\n]*?)"?\s*)?<([^<>\s]+)>$/.exec(value) ?? /^()([^<>\s"]+)$/.exec(value);
		const address = match ? z.email().safeParse(match[2]) : undefined;
		if (!match || !address?.success) {
			ctx.addIssue({
				code: 'custom',
				message: 'MAIL_FROM must be an address or `Name <address>`, e.g. Lugline <notices@example.com>'
			});
			return z.NEVER;
		}
		return { name: match[1].trim(), address: address.data };
	});

const schema = z.object({
	DATABASE_URL: z.string().startsWith('postgres', 'DATABASE_URL must be a postgres:// connection string'),
	AUTH_SECRET: z.string().min(16, 'AUTH_SECRET must be set to a random string of at least 16 characters'),
	DB_POOL_MAX: z.coerce.number().int().min(1).max(100).default(10),
	// How long a request waits for a database connection before it answers 503.
	DB_ACQUIRE_TIMEOUT_MS: z.coerce.number().int().min(100).max(60_000).default(1500),
	// Photo storage: any S3-compatible store. The defaults are the local fake that `npm start` runs (scripts/s3-fake.mjs).
	S3_ENDPOINT: z.url({ error: 'S3_ENDPOINT must be a URL such as https://s3.eu-central-1.amazonaws.com' }),
	S3_REGION: z.string().min(1),
	S3_BUCKET: z.string().min(3, 'S3_BUCKET must name a bucket'),
	S3_ACCESS_KEY_ID: z.string().min(1, 'S3_ACCESS_KEY_ID must be set'),
	S3_SECRET_ACCESS_KEY: z.string().min(1, 'S3_SECRET_ACCESS_KEY must be set'),
	// Customer e-mail over SMTP. The defaults are the local catcher that `npm start` runs (scripts/mail-catcher.mjs).
	SMTP_HOST: z.string().trim().min(1, 'SMTP_HOST must name the mail server'),
	SMTP_PORT: z.coerce.number().int().min(1).max(65535, 'SMTP_PORT must be a port number'),
	// Empty user: no authentication.
	SMTP_USER: z.string(),
	SMTP_PASSWORD: z.string(),
	// true: TLS from the first byte (port 465). false: plain, upgraded with STARTTLS when the server offers it.
	SMTP_SECURE: flag('SMTP_SECURE'),
	MAIL_FROM: sender,
	// The outbox sender loop (src/lib/server/mail/sender.ts): how often each instance looks for due notices, how
	// many it sends per pass, and the retries: base × 2^(attempt − 1), at most the cap, given up after N attempts.
	MAIL_POLL_MS: z.coerce.number().int().min(50).max(600_000).default(3000),
	MAIL_BATCH: z.coerce.number().int().min(1).max(500).default(20),
	MAIL_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(50).default(10),
	MAIL_RETRY_BASE_MS: z.coerce.number().int().min(50).max(86_400_000).default(30_000),
	MAIL_RETRY_MAX_MS: z.coerce
		.number()
		.int()
		.min(50)
		.max(7 * 86_400_000)
		.default(3_600_000),
	// Set by `npm start` when the local catcher runs: where it keeps what it caught (shown on /manage/outbox).
	MAIL_CAPTURE_DIR: z.string().optional()
});

export type ServerConfig = z.output<typeof schema>;

let cached: ServerConfig | undefined;

export function config(): ServerConfig {
	if (cached) return cached;
	const parsed = schema.safeParse({
		DATABASE_URL: env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54329/lugline',
		AUTH_SECRET: env.AUTH_SECRET,
		DB_POOL_MAX: env.DB_POOL_MAX,
		DB_ACQUIRE_TIMEOUT_MS: env.DB_ACQUIRE_TIMEOUT_MS,
		S3_ENDPOINT: env.S3_ENDPOINT ?? 'http://127.0.0.1:54349',
		S3_REGION: env.S3_REGION ?? 'us-east-1',
		S3_BUCKET: env.S3_BUCKET ?? 'lugline-photos',
		S3_ACCESS_KEY_ID: env.S3_ACCESS_KEY_ID ?? 'S3RVER',
		S3_SECRET_ACCESS_KEY: env.S3_SECRET_ACCESS_KEY ?? 'S3RVER',
		SMTP_HOST: env.SMTP_HOST ?? '127.0.0.1',
		SMTP_PORT: env.SMTP_PORT ?? '54369',
		SMTP_USER: env.SMTP_USER ?? '',
		SMTP_PASSWORD: env.SMTP_PASSWORD ?? '',
		SMTP_SECURE: env.SMTP_SECURE ?? 'false',
		MAIL_FROM: env.MAIL_FROM ?? 'Lugline (demo) <notices@demo.lugline.test>',
		MAIL_POLL_MS: env.MAIL_POLL_MS,
		MAIL_BATCH: env.MAIL_BATCH,
		MAIL_MAX_ATTEMPTS: env.MAIL_MAX_ATTEMPTS,
		MAIL_RETRY_BASE_MS: env.MAIL_RETRY_BASE_MS,
		MAIL_RETRY_MAX_MS: env.MAIL_RETRY_MAX_MS,
		MAIL_CAPTURE_DIR: env.MAIL_CAPTURE_DIR || undefined
	});
	if (!parsed.success) {
		const problems = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
		throw new Error(`Lugline is not configured: ${problems}`);
	}
	cached = parsed.data;
	return cached;
}
