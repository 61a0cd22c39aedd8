// Throw-away databases in the tests' cluster, for tests that must start from an empty schema.
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { testDatabaseUrl, withClient } from './database';

export function scratchUrl(name: string): string {
	const url = new URL(testDatabaseUrl);
	url.pathname = `/${name}`;
	return url.toString();
}

export async function createScratch(name: string): Promise<string> {
	const admin = scratchUrl('postgres');
	await withClient(async (c) => {
		await c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
		await c.query(`CREATE DATABASE "${name}"`);
	}, admin);
	return scratchUrl(name);
}

export async function dropScratch(name: string): Promise<void> {
	await withClient((c) => c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`), scratchUrl('postgres'));
}

/** Runs the Knex CLI exactly as `npm start` does (TypeScript knexfile through tsx). */
export function knexCli(args: string[], databaseUrl: string): string {
	const result = spawnSync(
		process.execPath,
		['--import', 'tsx', join('node_modules', 'knex', 'bin', 'cli.js'), ...args, '--knexfile', 'knexfile.ts'],
		{ encoding: 'utf8', env: { ...process.env, DATABASE_URL: databaseUrl } }
	);
	if (result.status !== 0) throw new Error(`knex ${args.join(' ')} failed:\n${result.stdout}\n${result.stderr}`);
	return result.stdout;
}
