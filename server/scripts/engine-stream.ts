import { pino } from 'pino';
import { loadConfig } from '../config';
import { EngineConsumer } from '../consumers/engine-consumer';

/**
 * Makes the engine's stream of the units' readings (server/scripts/engine.sh runs it once the nodes are up), so a reading
 * published before any worker has started is kept for the workers instead of being acknowledged to no one.
 */
const config = loadConfig();
if (!config.engine) {
  console.error('[engine] set BW_ENGINE_PASSWORD (and BW_ENGINE_URLS)');
  process.exit(2);
}
const consumer = new EngineConsumer(() => undefined, pino({ level: 'silent' }), {
  urls: config.engine.urls,
  user: config.engine.service.user,
  password: config.engine.service.password,
  replicas: config.engine.replicas,
});
try {
  await consumer.open();
  console.error(`[engine] readings stream ready (${config.engine.replicas} cop${config.engine.replicas === 1 ? 'y' : 'ies'} per reading)`);
} catch (err) {
  console.error(`[engine] cannot make the readings stream: ${(err as Error).message}`);
  process.exitCode = 1;
} finally {
  await consumer.close();
}
