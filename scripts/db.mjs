// `npm run db:start` / `npm run db:stop` for the app's private cluster; `--test` for the tests' cluster.
// `node scripts/db.mjs restart --test` restarts the tests' cluster (the reliability suite's outage test uses it).
import { clusters } from './config.mjs';
import { log, restartCluster, startCluster, stopCluster } from './setup.mjs';

const cluster = process.argv.includes('--test') ? clusters.test : clusters.app;
const command = process.argv[2];
if (command === 'start') {
	await startCluster(cluster);
	log(`the ${cluster.name} cluster is running on 127.0.0.1:${cluster.port}`);
} else if (command === 'stop') {
	log(stopCluster(cluster) ? `stopped the ${cluster.name} cluster` : `the ${cluster.name} cluster was not running`);
} else if (command === 'restart') {
	restartCluster(cluster);
	log(`restarted the ${cluster.name} cluster`);
} else {
	console.error('usage: node scripts/db.mjs start|stop|restart [--test]');
	process.exit(2);
}
