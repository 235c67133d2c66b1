import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { randomBytes } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { pino, type Logger } from 'pino';
import type { Config } from './config';
import { createDb, describeDbError, pingDatabase, type Db } from './data/db';
import { UserRepository } from './data/user-repository';
import { OwnerRepository } from './data/owner-repository';
import { SiteRepository } from './data/site-repository';
import { UnitRepository } from './data/unit-repository';
import { AuditRepository } from './data/audit-repository';
import { SessionRepository } from './data/session-repository';
import { AuditService } from './services/audit-service';
import { auditRoutes } from './routes/audit-routes';
import { detectorTiltRoutes } from './routes/detector-tilt-routes';
import { TicketRepository } from './data/ticket-repository';
import { TicketService, type TicketOptions } from './services/ticket-service';
import { ticketRoutes } from './routes/ticket-routes';
import { FileStore } from './data/file-store';
import { TicketFileRepository } from './data/ticket-file-repository';
import { TicketFileService } from './services/ticket-file-service';
import { ticketFileRoutes } from './routes/ticket-file-routes';
import { demoHistoryRoutes } from './routes/demo-history-routes';
import { DemoHistoryStatus } from './services/demo-history-status';
import { HistoryRepository } from './data/history-repository';
import { MailOutboxRepository } from './data/mail-outbox-repository';
import { NotificationRepository } from './data/notification-repository';
import { MailService, type MailOptions } from './services/mail-service';
import { NotificationService, type NotificationOptions } from './services/notification-service';
import { notificationRoutes } from './routes/notification-routes';
import { smtpTransport, type MailTransport } from './mail/smtp-transport';
import { statementRoutes } from './routes/statement-routes';
import { StatementService } from './services/statement-service';
import { StatementRepository } from './data/statement-repository';
import { StatementLockRepository } from './data/statement-lock-repository';
import { StatementLockService, type StatementLockOptions } from './services/statement-lock-service';
import { AuthService } from './services/auth-service';
import { AdminService } from './services/admin-service';
import { SignInLimiter } from './services/sign-in-limiter';
import { sharedAttemptCounter } from './data/sign-in-attempt-store';
import { LeaderLock } from './data/leader-lock';
import { UnitHeardRepository } from './data/unit-heard-repository';
import { EngineAuth } from './services/engine-auth';
import { followLive } from './services/live-relay';
import { openLiveBus } from './consumers/live-bus';
import { DEFAULT_LEADERSHIP_OPTIONS, Leadership, lockLostAfterS, type LeadershipOptions } from './services/leadership';
import { Passwords } from './services/passwords';
import { SessionEvents } from './services/session-events';
import { deviceSecretMatches } from './services/device-secret';
import { TelemetryRepository } from './data/telemetry-repository';
import { CommandStore } from './data/command-repository';
import { UnitDirectory, type UnitInfo } from './services/unit-directory';
import { IngestService, type IngestListeners, type IngestOptions } from './services/ingest-service';
import { RollupWorker } from './services/rollup-worker';
import { QuarterModelService } from './services/quarter-model-service';
import { RetentionJob } from './services/retention-job';
import { TelemetryPartitions } from './data/telemetry-partitions';
import { LiveHub } from './services/live-hub';
import { CommandService, type CommandOptions } from './services/command-service';
import { countDenied, unitMessageHandler } from './consumers/mqtt-consumer';
import { telemetryRoutes } from './routes/telemetry-routes';
import { attachLiveSocket } from './routes/live-socket';
import { siteModelRoutes } from './routes/site-model-routes';
import { SiteModelService } from './services/site-model-service';
import { HealthService, DEFAULT_HEALTH_SERVICE_OPTIONS, type HealthServiceOptions } from './services/health-service';
import { AlarmRepository } from './data/alarm-repository';
import { HealthReadRepository } from './data/health-read-repository';
import { HealthSettingsRepository } from './data/health-settings-repository';
import { SiteModelRepository } from './data/site-model-repository';
import { HoldRepository } from './data/hold-repository';
import { AlarmStore } from './services/alarm-store';
import { AlarmService } from './services/alarm-service';
import { HealthSettingsService } from './services/health-settings-service';
import { DetectorTiltService } from './services/detector-tilt-service';
import { HealthReplay } from './services/health-replay';
import { ScanService } from './services/scan-service';
import { SiteModelCache } from './services/site-model-cache';
import { TelemetryHistory } from './services/telemetry-history';
import { alarmRoutes } from './routes/alarm-routes';
import { traceRoutes } from './routes/trace-routes';
import { landscapeRoutes } from './routes/landscape-routes';
import { TraceService } from './services/trace-service';
import { LandscapeService } from './services/landscape-service';
import { SurveyRevisionRepository } from './data/survey-revision-repository';
import { SurveyRevisionService, type SurveyRevisionOptions } from './services/survey-revision-service';
import { surveyRevisionRoutes } from './routes/survey-revision-routes';
import { TraceRepository } from './data/trace-repository';
import { unitTopic } from '../shared/contracts/topics';
import { createApp } from './app';
import { startBroker, type BrokerLimits, type Principal, type RunningBroker } from '../broker/broker';
import { ensureDevCertificate } from '../broker/dev-certificate';
import { unitPrefix } from '../shared/contracts/topics';

export const VERSION: string = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')).version;

export interface Stack {
  url: string;
  db: Db;
  broker: RunningBroker;
  ingest: IngestService;
  rollups: RollupWorker;
  live: LiveHub;
  commands: CommandService;
  units: UnitDirectory;
  siteModel: SiteModelService;
  retention: RetentionJob;
  health: HealthService;
  tickets: TicketService;
  /** Where ticket files' bytes are (the S3 API: a bucket, or the local store this process started). */
  files: FileStore;
  mail: MailService;
  notifications: NotificationService;
  /** The monthly lock of statements (the job, restatements, late data). */
  statementLocks: StatementLockService;
  /** Whether this server runs the once-only jobs now (one server at a time, by a database lock). */
  leadership: Leadership;
  /** Resolves when the modelled best of every site's last day is cached (the first day of traces opens without waiting). */
  landscapesWarm: Promise<void>;
  http: Server;
  log: Logger;
  stop(): Promise<void>;
}

export class StartupError extends Error {}

/** Wires database, broker and HTTP server in one process (the ingest subscribes to the broker in-process). */
export interface StackOptions {
  /**
   * Fill the modelled-best cache for every site's last day in the background at start (default true). Short-lived
   * test stacks turn it off: they would spend seconds of CPU on it and use little of it.
   */
  warmLandscapes?: boolean;
  ingest?: Partial<IngestOptions>;
  commands?: Partial<CommandOptions>;
  /** Extra listeners on the ingest (benchmarks). */
  listeners?: IngestListeners;
  rollupIntervalMs?: number;
  health?: Partial<HealthServiceOptions>;
  /** Ticket rules' delays and clock (tests). */
  tickets?: Partial<TicketOptions>;
  /** Mail tries and waits, and where mail goes instead of the configured SMTP server (tests). */
  mail?: Partial<MailOptions> & { transport?: MailTransport };
  /** Escalation delay, digest hour and clock (tests). */
  notifications?: Partial<NotificationOptions>;
  /** The statement lock job's clock and interval; `autoLock: false` leaves the job stopped (tests sweep by hand). */
  statements?: Partial<StatementLockOptions> & { autoLock?: boolean };
  /** How often open live sockets have their session checked again [ms]; default 30 s. */
  sessionRecheckMs?: number;
  /** Broker limits other than the defaults (tests). */
  brokerLimits?: Partial<BrokerLimits>;
  /** Heartbeat and waits of the lock that picks the server running the once-only jobs (tests shorten them). */
  leadership?: Partial<LeadershipOptions>;
  /** Survey revisions' clock and scan counts (tests). */
  surveyRevisions?: Partial<SurveyRevisionOptions>;
}

export async function startStack(config: Config, log: Logger = pino({ level: config.logLevel }), opts: StackOptions = {}): Promise<Stack> {
  const db = createDb(config.db);
  try {
    await db.raw('SELECT 1');
  } catch (err) {
    await db.destroy();
    throw new StartupError(describeDbError(err, config.db));
  }
  let fileStore: FileStore;
  try {
    fileStore = await FileStore.open(config.files);
  } catch (err) {
    await db.destroy();
    throw new StartupError(`Cannot open the file store: ${(err as Error).message}`);
  }
  if (config.files.kind === 'local')
    log.warn(
      { store: fileStore.where },
      'ticket files go to the local store; set BW_S3_BUCKET (and BW_S3_ENDPOINT, credentials) in production',
    );
  const users = new UserRepository(db);
  const units = new UnitRepository(db);
  const audit = new AuditRepository(db);
  const auditLog = new AuditService(audit);
  const passwords = new Passwords(config.bcryptCost);
  const sessionEvents = new SessionEvents();
  const auth = new AuthService(
    { users, sessions: new SessionRepository(db), audit },
    // Counted in the database, so the limit holds across several servers.
    new SignInLimiter(sharedAttemptCounter(db, config.db.database, config.signInLimitPerMinute)),
    passwords,
    sessionEvents,
    {
      secret: config.sessionSecret ?? randomBytes(32).toString('hex'),
      sessionHours: config.sessionHours,
    },
  );
  let brokerRef: RunningBroker | undefined;
  // The external message engine lets in exactly the enabled units, each confined to its own topics.
  const engineAuth = config.engine?.dir
    ? new EngineAuth(units, config.engine.dir, config.engine.service, log, config.engine.partitions)
    : undefined;
  if (engineAuth)
    await engineAuth.write().catch(async (err) => {
      await fileStore.close();
      await db.destroy();
      throw new StartupError(`Cannot write the message engine's users in ${config.engine!.dir!}: ${(err as Error).message}`);
    });
  const directory = new UnitDirectory(units, new HoldRepository(db));
  await directory.load();
  const live = new LiveHub(directory);
  const admin = new AdminService({ users, owners: new OwnerRepository(db), sites: new SiteRepository(db), units, audit }, passwords, auth, {
    // Who may see and command a unit follows admin changes at once.
    onUnitChanged: async (_unitId, change) => {
      await directory.load().catch((err) => log.error({ err }, 'unit directory reload failed'));
      live.onDirectoryChanged();
      await engineAuth?.write().catch((err) => log.error({ err }, 'message engine users not rewritten'));
      // A disabled unit, a new secret or a new serial ends the unit's MQTT session at once (it must authenticate again).
      if (change.credentialsChanged || change.disabled) {
        for (const serial of new Set([change.serial, change.previousSerial ?? change.serial])) brokerRef?.disconnectUnit(serial);
      }
    },
  });

  const siteModel = new SiteModelService(new SiteModelRepository(db), auditLog);
  const landscapes = new LandscapeService(siteModel);
  const landscapesWarm =
    opts.warmLandscapes === false
      ? Promise.resolve()
      : landscapes.startWarming(() => [...new Set(directory.all().map((u) => u.siteId))], log);
  const telemetry = new TelemetryRepository(db);
  const quarterModel = new QuarterModelService(telemetry, siteModel, log);
  const rollups = new RollupWorker(telemetry, directory, log, opts.rollupIntervalMs ?? 2000, undefined, undefined, quarterModel);
  const healthOpts: HealthServiceOptions = { ...DEFAULT_HEALTH_SERVICE_OPTIONS, ...opts.health };
  const alarmRepo = new AlarmRepository(db);
  const healthReads = new HealthReadRepository(db);
  const healthSettings = new HealthSettingsService(new HealthSettingsRepository(db), admin, log, healthOpts.now, audit);
  const siteModels = new SiteModelCache(siteModel, log, healthOpts);
  const health = new HealthService(
    new AlarmStore(alarmRepo, directory, live, log),
    siteModels,
    healthSettings,
    live,
    log,
    healthOpts,
    config.cluster ? { heard: new UnitHeardRepository(db), units: directory } : undefined,
  );
  let commands: CommandService | undefined;
  const ingest = new IngestService(
    telemetry,
    directory,
    log,
    {
      // Live state as reports arrive (it ignores resends); health detectors once per stored reading, after its commit.
      telemetry: (u, t) => {
        live.onTelemetry(u, t);
        opts.listeners?.telemetry?.(u, t);
      },
      stored: (u, t) => {
        health.telemetry(u, t);
        opts.listeners?.stored?.(u, t);
      },
      event: (u, e) => {
        health.event(u, e);
        opts.listeners?.event?.(u, e);
      },
      weather: (u, w) => {
        health.weather(u, w);
        opts.listeners?.weather?.(u, w);
      },
      // The unit's PUBACK for an ack waits for the command to be updated; a failure closes its connection (it resends).
      ack: (u, a) =>
        commands?.onAck(u, a).catch((err: unknown) => {
          log.error({ err }, 'command ack failed');
          throw err;
        }),
      status: (u, st) => {
        live.onStatus(u, st);
        health.status(u, st);
        if (st.online) void commands?.onOnline(u).catch((err) => log.error({ err }, 'queued command dispatch failed'));
      },
      committed: opts.listeners?.committed,
    },
    { ...config.ingest, ...opts.ingest },
    (rows) => rollups.markStored(rows),
  );

  let tls: { port: number; cert: Buffer; key: Buffer } | undefined;
  if (config.broker.tls) {
    try {
      const files =
        config.broker.tls.certPath && config.broker.tls.keyPath
          ? { certPath: config.broker.tls.certPath, keyPath: config.broker.tls.keyPath }
          : ensureDevCertificate(join(process.cwd(), '.data', 'tls'));
      tls = { port: config.broker.tls.port, cert: readFileSync(files.certPath), key: readFileSync(files.keyPath) };
      if (!config.broker.tls.certPath)
        log.warn(
          { cert: files.certPath },
          'MQTT over TLS uses the self-signed development certificate; set BW_BROKER_TLS_CERT and BW_BROKER_TLS_KEY in production',
        );
    } catch (err) {
      await fileStore.close();
      await db.destroy();
      throw new StartupError(`Cannot offer MQTT over TLS: ${(err as Error).message}`);
    }
  }
  const broker = await startBroker({
    host: config.broker.host,
    port: config.broker.port,
    tls,
    unitPrefix,
    limits: { ...(config.broker.connectTimeoutMs ? { connectTimeoutMs: config.broker.connectTimeoutMs } : {}), ...opts.brokerLimits },
    onMessage: unitMessageHandler(ingest, log),
    // The ingest is the only reader of unit messages (units may subscribe only to their own commands).
    forwardTaken: false,
    onDenied: countDenied(ingest),
    authenticate: async (username, password): Promise<Principal | null> => {
      const u = await units.findCredentials(username);
      if (!u || u.disabled || !deviceSecretMatches(password, u.deviceSecretHash)) return null;
      return { kind: 'unit', serial: u.serial };
    },
  }).catch(async (err) => {
    await fileStore.close();
    await db.destroy();
    throw new StartupError(
      `Cannot start the MQTT broker on ${config.broker.host}:${config.broker.port}${tls ? ` (TLS ${tls.port})` : ''}: ${(err as Error).message}. Set BW_BROKER_PORT${tls ? ' / BW_BROKER_TLS_PORT' : ''} to a free port.`,
    );
  });
  commands = new CommandService(
    new CommandStore(db),
    directory,
    live,
    (serial, command) =>
      new Promise<void>((res, rej) =>
        broker.aedes.publish(
          {
            cmd: 'publish',
            topic: unitTopic(serial, 'commands'),
            payload: Buffer.from(JSON.stringify(command)),
            qos: 1,
            retain: false,
            dup: false,
          },
          (err) => (err ? rej(err) : res()),
        ),
      ),
    log,
    { onConfigured: (unitId, config, by, commandId) => admin.recordConfigured(unitId, config, by, commandId), ...opts.commands },
  );
  const ticketRepo = new TicketRepository(db);
  const ticketFiles = new TicketFileService(
    new TicketFileRepository(db),
    ticketRepo,
    admin,
    fileStore,
    log,
    opts.tickets?.now ?? healthOpts.now,
  );
  const tickets = new TicketService(ticketRepo, admin, commands, log, { now: healthOpts.now, ...opts.tickets }, ticketFiles);
  health.onAlarmRaised((a) => void tickets.onAlarmRaised(a));
  const { transport: mailTransport, ...mailOpts } = opts.mail ?? {};
  const mail = new MailService(new MailOutboxRepository(db), mailTransport ?? smtpTransport(config.mail), log, {
    attempts: config.mail.attempts,
    now: healthOpts.now,
    ...mailOpts,
  });
  const notifications = new NotificationService(
    new NotificationRepository(db),
    mail,
    live,
    (id) => tickets.get({ id: 0, role: 'admin', ownerId: null }, id),
    log,
    { ...config.notifications, now: healthOpts.now, ...opts.notifications },
  );
  tickets.onEvent((e) => notifications.onTicketEvent(e));
  const { autoLock, ...lockOpts } = opts.statements ?? {};
  const statementLockRepo = new StatementLockRepository(db);
  const statementNow = lockOpts.now ?? healthOpts.now;
  const statements = new StatementService(new StatementRepository(db), admin, tickets, statementNow, statementLockRepo);
  const statementLocks = new StatementLockService(
    statementLockRepo,
    statements,
    mail,
    auditLog,
    (unitId) => directory.byUnitId(unitId),
    log,
    { now: statementNow, ...lockOpts },
  );
  rollups.onRolled((q) => statementLocks.onQuartersRolled(q));
  siteModel.onSurveySaved((siteId) => statementLocks.onSurveyChanged(siteId));
  // A new survey is a new model for the detectors at once (not after the cache's refresh interval).
  siteModel.onSurveySaved((siteId) => siteModels.invalidate(siteId));
  const surveyRevisions = new SurveyRevisionService(new SurveyRevisionRepository(db), admin, siteModel, siteModels, health, {
    now: healthOpts.now,
    maxTiltDeg: healthOpts.maxTiltDeg,
    ...opts.surveyRevisions,
  });
  const retention = new RetentionJob(new TelemetryPartitions(db), config.ingest.retentionDays, log);
  // A restart keeps the fleet: the live picture and the comms watch start from each unit's last stored report.
  const restored: [UnitInfo, number, number][] = [];
  for (const row of await telemetry.latestPerUnit()) {
    const unit = directory.byUnitId(row.unitId);
    if (!unit) continue;
    live.restore(unit, row);
    restored.push([unit, row.receivedAt.getTime(), row.ts.getTime()]);
  }
  health.restore(restored);
  live.start();
  // Rollups follow the readings this server stored (a unit's minutes are marked by the server that stored them).
  rollups.start();
  commands.start();
  await health.start();
  // The jobs that must run once in the fleet run where the lock is; a lone server takes it at once.
  const leaderOpts = { ...DEFAULT_LEADERSHIP_OPTIONS, ...opts.leadership };
  const leadership = new Leadership(new LeaderLock(config.db, 'once-jobs', lockLostAfterS(leaderOpts)), log, leaderOpts);
  leadership.add({ name: 'retention', start: () => retention.start(), stop: () => retention.stop() });
  leadership.add({ name: 'comms watch', start: () => health.watch(true), stop: () => health.watch(false) });
  leadership.add({
    name: 'ticket timers',
    start: () => tickets.start(),
    stop: () => tickets.stop(),
  });
  leadership.add({
    name: 'notifications and digests',
    start: () => notifications.start(),
    stop: async () => {
      notifications.stop();
      await notifications.settle();
    },
  });
  if (autoLock !== false)
    leadership.add({
      name: 'statement lock',
      start: () => statementLocks.start(),
      stop: async () => {
        statementLocks.stop();
        await statementLocks.settle();
      },
    });
  leadership.add({
    name: 'queued mail',
    start: () => void mail.resume().catch((err) => log.error({ err }, 'queued mail not resumed')),
    stop: () => undefined,
  });
  await leadership.start();
  brokerRef = broker;

  const alarmService = new AlarmService(alarmRepo, admin, live, healthOpts.now);
  const allowedOrigins = new Set(config.allowedOrigins);
  const app = createApp({
    log,
    auth,
    admin,
    webDir: config.webDir,
    trustProxy: config.trustProxy,
    allowedOrigins,
    pingDatabase: () => pingDatabase(db),
    broker: () => ({ ok: true, port: broker.port, clients: broker.clients() }),
    routers: [
      telemetryRoutes({
        admin,
        commands,
        ingest,
        live,
        telemetry: new TelemetryHistory(telemetry),
        rollups,
        brokerCounters: () => broker.counters,
      }),
      siteModelRoutes(admin, siteModel),
      traceRoutes(admin, new TraceService(new TraceRepository(db), (siteId, at) => landscapes.bestWm2(siteId, at)), auditLog),
      landscapeRoutes(admin, landscapes),
      alarmRoutes({
        admin,
        settings: healthSettings,
        alarms: alarmService,
        scans: new ScanService(healthReads, admin, directory, siteModels),
        replay: new HealthReplay(healthReads, admin, directory, siteModels, healthSettings, alarmRepo),
      }),
      auditRoutes(auditLog),
      detectorTiltRoutes(admin, new DetectorTiltService(admin, siteModel, () => commands!, auditLog, healthSettings, log)),
      ticketRoutes(tickets, alarmService, auditLog),
      ticketFileRoutes(ticketFiles),
      demoHistoryRoutes(new DemoHistoryStatus(new HistoryRepository(db))),
      notificationRoutes(notifications, mail),
      statementRoutes(statements, auditLog, statementLocks),
      surveyRevisionRoutes(surveyRevisions),
    ],
  });
  // With the message engine, units' readings go to the ingest workers: their live events reach this server's dashboards
  // through the engine (core NATS `bw.live.<siteId>`).
  const liveBus = config.engine
    ? openLiveBus(
        { urls: config.engine.urls, user: config.engine.service.user, password: config.engine.service.password },
        log,
        (bus) => void followLive(bus, live, directory, (err) => log.warn({ err }, 'live event dropped')),
      )
    : undefined;
  const http = createServer(app);
  const liveSocket = attachLiveSocket(http, auth, live, sessionEvents, log, {
    allowedOrigins,
    sessionRecheckMs: opts.sessionRecheckMs ?? 30_000,
  });
  await new Promise<void>((res, rej) => {
    http.once('error', (err) =>
      rej(new StartupError(`Cannot listen on ${config.host}:${config.port}: ${err.message}. Set BW_PORT to a free port.`)),
    );
    http.listen(config.port, config.host, () => res());
  });
  const { port } = http.address() as AddressInfo;
  const url = `http://${config.host}:${port}`;

  let stopping: Promise<void> | undefined;
  const stop = () =>
    (stopping ??= (async () => {
      liveSocket.close();
      await liveBus?.close();
      http.closeAllConnections();
      await new Promise<void>((res) => http.close(() => res()));
      commands!.stop();
      live.stop();
      landscapes.stopWarming();
      await leadership.stop();
      await broker.close();
      await ingest.drain(5000);
      ingest.stop();
      await health.stop();
      tickets.stop();
      notifications.stop();
      statementLocks.stop();
      await tickets.settle();
      await notifications.settle();
      await statementLocks.settle();
      await mail.settle();
      mail.stop();
      rollups.stop();
      retention.stop();
      await rollups.runOnce({ includeOpenMinutes: true }).catch(() => undefined);
      await fileStore.close().catch((err) => log.error({ err }, 'file store did not close'));
      await db.destroy();
    })());
  return {
    url,
    db,
    broker,
    http,
    log,
    stop,
    ingest,
    rollups,
    live,
    commands,
    units: directory,
    siteModel,
    retention,
    health,
    tickets,
    files: fileStore,
    mail,
    notifications,
    statementLocks,
    leadership,
    landscapesWarm,
  };
}
