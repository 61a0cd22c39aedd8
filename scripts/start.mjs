// `npm start`: everything from a fresh machine to a served app with demo data.
// `npm run dev` (`--dev`): the same set-up, then the Vite dev server instead of the build.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { appDatabaseUrl, authSecret, clusters, host, origin, port, root } from './config.mjs';
import { ensureBuild, ensureDatabase, ensureDependencies, knex, log, serve, startCluster } from './setup.mjs';

const dev = process.argv.includes('--dev');

ensureDependencies();
if (!process.env.DATABASE_URL) {
	await startCluster(clusters.app);
	await ensureDatabase(clusters.app, clusters.app.database);
}
const databaseUrl = appDatabaseUrl();
log('migrating the database…');
knex(['migrate:latest'], databaseUrl);
log('loading the demo data (kept when already there)…');
knex(['seed:run'], databaseUrl);

const env = { HOST: host, PORT: String(port), ORIGIN: origin, AUTH_SECRET: authSecret(), DATABASE_URL: databaseUrl };
const accounts = JSON.parse(readFileSync(join(root, 'seeds', 'demo-accounts.json'), 'utf8'));
const banner = () => {
	console.log(`\n  Lugline is running at ${origin}\n`);
	console.log('  Demo sign-ins (invented demo staff):');
	for (const a of accounts) console.log(`    ${a.role.padEnd(8)} ${a.email.padEnd(28)} ${a.password}`);
	console.log(`\n  Ctrl+C stops the app; npm run db:stop stops the database.\n`);
};

if (dev) {
	banner();
	serve(process.execPath, [join('node_modules', 'vite', 'bin', 'vite.js'), 'dev', '--host', host, '--port', String(port), '--strictPort'], env);
} else {
	ensureBuild();
	banner();
	serve(process.execPath, ['build'], env);
}
