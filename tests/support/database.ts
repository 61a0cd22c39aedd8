// Direct access to the tests' database, for arranging and checking state behind the app's back.
import pg from 'pg';

export const testDatabaseUrl = process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54339/lugline_test';

export async function withClient<T>(work: (client: pg.Client) => Promise<T>, url = testDatabaseUrl): Promise<T> {
	const client = new pg.Client({ connectionString: url });
	await client.connect();
	try {
		return await work(client);
	} finally {
		await client.end();
	}
}
