import type { Logger } from 'pino';
import type { Config } from './config';
import { createDb, describeDbError, type Db } from './data/db';
import { UnitRepository } from './data/unit-repository';
import { HoldRepository } from './data/hold-repository';
import { TelemetryRepository } from './data/telemetry-repository';
import { AlarmRepository } from './data/alarm-repository';
import { AuditRepository } from './data/audit-repository';
import { HealthSettingsRepository } from './data/health-settings-repository';
import { SiteModelRepository } from './data/site-model-repository';
import { UnitHeardRepository } from './data/unit-heard-repository';
import { LeaderLock } from './data/leader-lock';
import { UnitDirectory, type UnitInfo } from './services/unit-directory';
import { IngestService } from './services/ingest-service';
import { RollupWorker } from './services/rollup-worker';
import { QuarterModelService } from './services/quarter-model-service';
import { RelayingLiveHub } from './services/live-relay';
import { HealthService, DEFAULT_HEALTH_SERVICE_OPTIONS } from './services/health-service';
import { HealthSettingsService } from './services/health-settings-service';
import { SiteModelCache } from './services/site-model-cache';
import { SiteModelService } from './services/site-model-service';
import { AlarmStore } from './services/alarm-store';
import { AuditService } from './services/audit-service';
import { DEFAULT_LEADERSHIP_OPTIONS, Leadership, lockLostAfterS, type LeadershipOptions } from './services/leadership';
import { EngineConsumer, type EngineConsumerOptions } from './consumers/engine-consumer';
import { StartupError } from './stack';

export interface WorkerOptions {
  /** Partitions this worker takes when they are free. */
  partitions: number[];
  /** Partitions it takes only after `standbyDelayMs` when their own worker has not (or once it has died). */
  standby: number[];
  standbyDelayMs?: number;
  leadership?: Partial<LeadershipOptions>;
  consumer?: Partial<EngineConsumerOptions>;
}

export interface Worker {
  db: Db;
  ingest: IngestService;
  /** Partitions whose readings this worker takes now. */
  taking(): number[];
  stop(): Promise<void>;
}

/**
 * An ingest worker (`npm run worker`): the same ingest, rollups and health engine as the server, fed from the message
 * engine instead of the built-in broker. Each partition (the units of some sites) is taken by one worker at a time —
 * the holder of the database lock `partition-<p>` — so a site's health state stays on one worker; a standby worker
 * waits on the lock and takes the partition over when its worker dies, rebuilding the sites' state from the stored
 * readings and the ones that follow. The comms watch stays with the leading server, which reads the last-heard times
 * the workers share.
 */
export async function startWorker(config: Config, log: Logger, opts: WorkerOptions): Promise<Worker> {
  if (!config.engine) throw new StartupError('A worker needs the message engine: set BW_ENGINE_PASSWORD (and BW_ENGINE_URLS).');
  const engine = config.engine;
  for (const p of [...opts.partitions, ...opts.standby])
    if (!Number.isInteger(p) || p < 0 || p >= engine.partitions)
      throw new StartupError(
        `Partition ${p} does not exist: BW_ENGINE_PARTITIONS is ${engine.partitions} (partitions 0–${engine.partitions - 1}).`,
      );
  const db = createDb(config.db);
  try {
    await db.raw('SELECT 1');
  } catch (err) {
    await db.destroy();
    throw new StartupError(describeDbError(err, config.db));
  }
  const units = new UnitRepository(db);
  const directory = new UnitDirectory(units, new HoldRepository(db));
  await directory.load();
  // Units and sites change on the servers: follow them (a unit not known yet is looked up at once on its first reading).
  const reload = setInterval(() => void directory.load().catch((err) => log.warn({ err }, 'unit directory reload failed')), 10_000);
  reload.unref();
  // Built before the consumer opens its connection: the bus drops live events until then.
  let consumerRef: EngineConsumer | undefined;
  const live = new RelayingLiveHub(directory, {
    publish: (subject, data) => consumerRef?.bus().publish(subject, data),
    subscribe: () => {
      throw new Error('a worker does not follow live events');
    },
  });
  const telemetry = new TelemetryRepository(db);
  const siteModel = new SiteModelService(new SiteModelRepository(db), new AuditService(new AuditRepository(db)));
  const rollups = new RollupWorker(
    telemetry,
    directory,
    log,
    2000,
    undefined,
    undefined,
    new QuarterModelService(telemetry, siteModel, log),
  );
  const healthOpts = DEFAULT_HEALTH_SERVICE_OPTIONS;
  const noSettingsRoutes = {
    getSite: () => Promise.reject(new Error('a worker serves no settings routes')),
  };
  const healthSettings = new HealthSettingsService(
    new HealthSettingsRepository(db),
    noSettingsRoutes,
    log,
    healthOpts.now,
    new AuditRepository(db),
  );
  const health = new HealthService(
    new AlarmStore(new AlarmRepository(db), directory, live, log),
    new SiteModelCache(siteModel, log, healthOpts),
    healthSettings,
    live,
    log,
    healthOpts,
    { heard: new UnitHeardRepository(db), units: directory },
  );
  const ingest = new IngestService(
    telemetry,
    directory,
    log,
    {
      stored: (u, t) => health.telemetry(u, t),
      event: (u, e) => health.event(u, e),
      weather: (u, w) => health.weather(u, w),
      status: (u, st) => health.status(u, st),
    },
    config.ingest,
    (rows) => rollups.markStored(rows),
  );
  const restored: [UnitInfo, number, number][] = [];
  for (const row of await telemetry.latestPerUnit()) {
    const unit = directory.byUnitId(row.unitId);
    if (unit) restored.push([unit, row.receivedAt.getTime(), row.ts.getTime()]);
  }
  health.restore(restored);
  await health.start();
  rollups.start();

  const consumer = new EngineConsumer((serial, leaf, payload, ack) => ingest.receive(serial, leaf, payload, ack), log, {
    urls: engine.urls,
    user: engine.service.user,
    password: engine.service.password,
    replicas: engine.replicas,
    ...opts.consumer,
  });
  consumerRef = consumer;
  try {
    await consumer.open();
  } catch (err) {
    clearInterval(reload);
    await db.destroy();
    throw new StartupError(`Cannot reach the message engine at ${engine.urls.join(', ')}: ${(err as Error).message}`);
  }
  const leaderOpts = { ...DEFAULT_LEADERSHIP_OPTIONS, ...opts.leadership };
  const taking = new Set<number>();
  const leads = new Map<number, Leadership>();
  const lead = (p: number) => {
    const l = new Leadership(new LeaderLock(config.db, `partition-${p}`, lockLostAfterS(leaderOpts)), log, leaderOpts);
    l.add({
      name: `partition ${p}`,
      start: async () => {
        await consumer.start(p);
        taking.add(p);
      },
      stop: async () => {
        taking.delete(p);
        await consumer.stop(p);
      },
    });
    leads.set(p, l);
    return l.start();
  };
  for (const p of opts.partitions) await lead(p);
  const standbyTimer = setTimeout(() => {
    for (const p of opts.standby)
      if (!leads.has(p))
        void lead(p).then(
          () => log.info({ partition: p, taking: taking.has(p) }, 'standing by for partition'),
          (err) => log.error({ err, partition: p }, 'standby failed'),
        );
  }, opts.standbyDelayMs ?? 3000);
  standbyTimer.unref();

  let stopping: Promise<void> | undefined;
  return {
    db,
    ingest,
    taking: () => [...taking].sort((a, b) => a - b),
    stop: () =>
      (stopping ??= (async () => {
        clearTimeout(standbyTimer);
        clearInterval(reload);
        for (const l of leads.values()) await l.stop();
        await ingest.drain(5000);
        ingest.stop();
        await consumer.close();
        await health.stop();
        rollups.stop();
        await rollups.runOnce({ includeOpenMinutes: true }).catch(() => undefined);
        await db.destroy();
      })()),
  };
}
