// `npm run db:start` / `npm run db:stop` for the app's private cluster; `--test` for the tests' cluster.
import { clusters } from './config.mjs';
import { log, startCluster, stopCluster } from './setup.mjs';

const cluster = process.argv.includes('--test') ? clusters.test : clusters.app;
const command = process.argv[2];
if (command === 'start') {
	await startCluster(cluster);
	log(`the ${cluster.name} cluster is running on 127.0.0.1:${cluster.port}`);
} else if (command === 'stop') {
	log(stopCluster(cluster) ? `stopped the ${cluster.name} cluster` : `the ${cluster.name} cluster was not running`);
} else {
	console.error('usage: node scripts/db.mjs start|stop [--test]');
	process.exit(2);
}
