// The server's settings, read once from the environment and checked, so a missing secret fails loudly at start-up
// instead of as a 500 on the first request.
import { env } from '$env/dynamic/private';
import { z } from 'zod';

const schema = z.object({
	DATABASE_URL: z.string().startsWith('postgres', 'DATABASE_URL must be a postgres:// connection string'),
	AUTH_SECRET: z.string().min(16, 'AUTH_SECRET must be set to a random string of at least 16 characters'),
	DB_POOL_MAX: z.coerce.number().int().min(1).max(100).default(10),
	// How long a request waits for a database connection before it answers 503.
	DB_ACQUIRE_TIMEOUT_MS: z.coerce.number().int().min(100).max(60_000).default(3000),
	// Photo storage: any S3-compatible store. The defaults are the local fake that `npm start` runs (scripts/s3-fake.mjs).
	S3_ENDPOINT: z.url({ error: 'S3_ENDPOINT must be a URL such as https://s3.eu-central-1.amazonaws.com' }),
	S3_REGION: z.string().min(1),
	S3_BUCKET: z.string().min(3, 'S3_BUCKET must name a bucket'),
	S3_ACCESS_KEY_ID: z.string().min(1, 'S3_ACCESS_KEY_ID must be set'),
	S3_SECRET_ACCESS_KEY: z.string().min(1, 'S3_SECRET_ACCESS_KEY must be set')
});

export type ServerConfig = z.infer<typeof schema>;

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
		S3_SECRET_ACCESS_KEY: env.S3_SECRET_ACCESS_KEY ?? 'S3RVER'
	});
	if (!parsed.success) {
		const problems = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
		throw new Error(`Lugline is not configured: ${problems}`);
	}
	cached = parsed.data;
	return cached;
}
