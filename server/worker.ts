import { pino } from 'pino';
import { ConfigError, loadConfig } from './config';
import { StartupError } from './stack';
import { startWorker } from './worker-stack';

/** `npm run worker`: an ingest worker on the message engine (server/worker-stack.ts). */
const list = (v: string | undefined, name: string): number[] => {
  if (v === undefined || v.trim() === '') return [];
  const parts = v.split(',').map((p) => p.trim());
  if (!parts.every((p) => /^\d{1,2}$/.test(p))) {
    console.error(`Invalid configuration:\n  ${name}: a comma list of partition numbers such as 0,2 (not ${v})`);
    process.exit(2);
  }
  return parts.map(Number);
};

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
  const partitions = list(process.env['BW_WORKER_PARTITIONS'], 'BW_WORKER_PARTITIONS');
  const standby = list(process.env['BW_WORKER_STANDBY'], 'BW_WORKER_STANDBY');
  if (!partitions.length && !standby.length) {
    console.error('Invalid configuration:\n  BW_WORKER_PARTITIONS: the partitions this worker takes (such as 0), or BW_WORKER_STANDBY');
    process.exit(2);
  }
  const standbyDelay = process.env['BW_WORKER_STANDBY_DELAY_MS'];
  if (standbyDelay !== undefined && !/^\d+$/.test(standbyDelay)) {
    console.error(`Invalid configuration:\n  BW_WORKER_STANDBY_DELAY_MS: a whole number of milliseconds (not ${standbyDelay})`);
    process.exit(2);
  }
  const ackWait = process.env['BW_WORKER_ACK_WAIT_MS'];
  if (ackWait !== undefined && !(/^\d+$/.test(ackWait) && Number(ackWait) >= 1000)) {
    console.error(`Invalid configuration:\n  BW_WORKER_ACK_WAIT_MS: a whole number of milliseconds, at least 1000 (not ${ackWait})`);
    process.exit(2);
  }
  const log = pino({ level: config.logLevel });
  let worker;
  try {
    worker = await startWorker(config, log, {
      partitions,
      standby,
      ...(standbyDelay !== undefined ? { standbyDelayMs: Number(standbyDelay) } : {}),
      ...(ackWait !== undefined ? { consumer: { ackWaitMs: Number(ackWait) } } : {}),
    });
  } catch (err) {
    if (err instanceof StartupError) {
      console.error(`Brightward worker cannot start: ${err.message}`);
      process.exit(1);
    }
    throw err;
  }
  log.info({ partitions, standby, taking: worker.taking() }, 'Brightward worker ready');
  const shutdown = (signal: string) => {
    log.info({ signal }, 'stopping');
    worker.stop().then(
      () => process.exit(0),
      (err) => {
        log.error({ err }, 'unclean stop');
        process.exit(1);
      },
    );
  };
  process.once('SIGINT', shutdown);
  process.once('SIGTERM', shutdown);
  process.on('unhandledRejection', (err) => log.error({ err }, 'unhandled promise rejection'));
}

void main();
