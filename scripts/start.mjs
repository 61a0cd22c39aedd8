// `npm start`: everything from a fresh machine to a served app with demo data.
// `npm run dev` (`--dev`): the same set-up, then the Vite dev server instead of the build.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import {
	appDatabaseUrl,
	authSecret,
	bodySizeLimit,
	clusters,
	host,
	localS3Endpoint,
	mailCatchers,
	origin,
	port,
	root,
	s3,
	s3Env,
	s3Fakes,
	smtp,
	smtpEnv,
	smtpIsLocal
} from './config.mjs';
import {
	ensureBuild,
	ensureDatabase,
	ensureDependencies,
	knex,
	log,
	serve,
	startCluster,
	startMailCatcher,
	startS3Fake
} from './setup.mjs';

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

const env = {
	HOST: host,
	PORT: String(port),
	ORIGIN: origin,
	AUTH_SECRET: authSecret(),
	DATABASE_URL: databaseUrl,
	...s3Env(),
	...smtpEnv(),
	BODY_SIZE_LIMIT: bodySizeLimit,
	AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true'
};
// Photos go to the local S3 fake unless S3_ENDPOINT names other storage, and customer e-mail to the local SMTP
// catcher unless SMTP_HOST/SMTP_PORT name a mail service; both stop when this script exits.
const startPhotoStore = async () => {
	if (s3.endpoint === localS3Endpoint) await startS3Fake(s3Fakes.app);
	else log(`photos go to ${s3.endpoint} (bucket ${s3.bucket}); no local S3 fake`);
};
const startMail = async () => {
	if (smtpIsLocal) await startMailCatcher(mailCatchers.app);
	else log(`customer e-mail goes to ${smtp.host}:${smtp.port}; no local mail catcher`);
};
const accounts = JSON.parse(readFileSync(join(root, 'seeds', 'demo-accounts.json'), 'utf8'));
const banner = () => {
	console.log(`\n  Lugline is running at ${origin}\n`);
	console.log('  Demo sign-ins (invented demo staff):');
	for (const a of accounts) console.log(`    ${a.role.padEnd(8)} ${a.email.padEnd(28)} ${a.password}`);
	if (smtpIsLocal)
		console.log(`\n  Customer e-mail is caught, not delivered: ${mailCatchers.app.dir} (and /manage/outbox).`);
	console.log(
		`\n  Ctrl+C stops the app (and the local S3 fake and mail catcher); npm run db:stop stops the database.\n`
	);
};

if (dev) {
	await startPhotoStore();
	await startMail();
	banner();
	serve(
		process.execPath,
		[join('node_modules', 'vite', 'bin', 'vite.js'), 'dev', '--host', host, '--port', String(port), '--strictPort'],
		env
	);
} else {
	ensureBuild();
	await startPhotoStore();
	await startMail();
	banner();
	serve(process.execPath, ['build'], env);
}
