/** `npm run db:stop` (and `tsx server/db/cluster-cli.ts start`): manage the project clusters by hand. */
import { devCluster, ensureCluster, stopCluster, testCluster } from './cluster';

const log = (message: string) => console.log(message);
const command = process.argv[2];

try {
  if (command === 'stop') {
    const stoppedDev = await stopCluster(devCluster, log);
    const stoppedTest = await stopCluster(testCluster, log);
    if (!stoppedDev && !stoppedTest) console.log('No project PostgreSQL cluster is running.');
  } else if (command === 'start') {
    await ensureCluster(devCluster, log);
    console.log(`The development cluster is running on 127.0.0.1:${devCluster.port}.`);
  } else {
    console.error('Usage: tsx server/db/cluster-cli.ts start|stop');
    process.exitCode = 2;
  }
} catch (error) {
  console.error((error as Error).message);
  process.exitCode = 1;
}
