// Knex's own configuration: the CLI (`npm run db:migrate`, `npm run seed`) and the tests read it.
// Run through tsx: `node --import tsx ./node_modules/knex/bin/cli.js migrate:latest --knexfile knexfile.ts`.
import type { Knex } from 'knex';
import { appDatabaseUrl } from './scripts/config.mjs';

const config: Knex.Config = {
	client: 'pg',
	connection: appDatabaseUrl(),
	pool: { min: 0, max: 4 },
	migrations: { directory: './migrations', extension: 'ts', loadExtensions: ['.ts'] },
	seeds: { directory: process.env.LUGLINE_SEEDS ?? './seeds', loadExtensions: ['.ts'] }
};

export default config;
