// The server's settings, read once from the environment and checked, so a missing secret fails loudly at start-up
// instead of as a 500 on the first request.
import { env } from '$env/dynamic/private';
import { z } from 'zod';

const schema = z.object({
	DATABASE_URL: z.string().startsWith('postgres', 'DATABASE_URL must be a postgres:// connection string'),
	AUTH_SECRET: z.string().min(16, 'AUTH_SECRET must be set to a random string of at least 16 characters'),
	DB_POOL_MAX: z.coerce.number().int().min(1).max(100).default(10),
	// How long a request waits for a database connection before it answers 503.
	DB_ACQUIRE_TIMEOUT_MS: z.coerce.number().int().min(100).max(60_000).default(3000)
});

export type ServerConfig = z.infer<typeof schema>;

let cached: ServerConfig | undefined;

export function config(): ServerConfig {
	if (cached) return cached;
	const parsed = schema.safeParse({
		DATABASE_URL: env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54329/lugline',
		AUTH_SECRET: env.AUTH_SECRET,
		DB_POOL_MAX: env.DB_POOL_MAX,
		DB_ACQUIRE_TIMEOUT_MS: env.DB_ACQUIRE_TIMEOUT_MS
	});
	if (!parsed.success) {
		const problems = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
		throw new Error(`Lugline is not configured: ${problems}`);
	}
	cached = parsed.data;
	return cached;
}
