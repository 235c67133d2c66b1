import { pino } from 'pino';
import { ConfigError, loadConfig } from './config';
import { StartupError, VERSION, startStack } from './stack';

/** Entry point: validate config, start the stack, stop cleanly on SIGINT/SIGTERM. */
async function main(): Promise<void> {
  let config;
  try {
    config = loadConfig();
  } catch (err) {
    if (err instanceof ConfigError) {
      console.error(err.message);
      process.exit(2);
    }
    throw err;
  }
  const log = pino({ level: config.logLevel });
  let stack;
  try {
    stack = await startStack(config, log);
  } catch (err) {
    if (err instanceof StartupError) {
      console.error(`Brightward cannot start: ${err.message}`);
      process.exit(1);
    }
    throw err;
  }
  log.info({ url: stack.url, brokerPort: stack.broker.port, version: VERSION }, 'Brightward server ready');
  const shutdown = (signal: string) => {
    log.info({ signal }, 'stopping');
    stack.stop().then(
      () => process.exit(0),
      (err) => {
        log.error({ err }, 'unclean stop');
        process.exit(1);
      },
    );
  };
  process.once('SIGINT', shutdown);
  process.once('SIGTERM', shutdown);
  // Every entry point catches its own errors; these are the last line. A stray rejection is logged and the fleet keeps
  // running. An uncaught exception leaves the process in an unknown state: log it, stop as cleanly as possible and exit;
  // `npm start` starts the server again (server/scripts/supervise.sh).
  process.on('unhandledRejection', (err) => log.error({ err }, 'unhandled promise rejection'));
  process.once('uncaughtException', (err) => {
    log.fatal({ err }, 'uncaught exception; stopping');
    const force = setTimeout(() => process.exit(1), 10_000);
    force.unref();
    stack.stop().finally(() => process.exit(1));
  });
}

void main();
