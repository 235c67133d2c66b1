import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { randomBytes } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { pino, type Logger } from 'pino';
import type { Config } from './config';
import { createDb, describeDbError, type Db } from './data/db';
import { UserRepository } from './data/user-repository';
import { OwnerRepository } from './data/owner-repository';
import { SiteRepository } from './data/site-repository';
import { UnitRepository } from './data/unit-repository';
import { AuditRepository } from './data/audit-repository';
import { AuthService } from './services/auth-service';
import { AdminService } from './services/admin-service';
import { SignInLimiter } from './services/sign-in-limiter';
import { deviceSecretMatches } from './services/device-secret';
import { createApp } from './app';
import { startBroker, type Principal, type RunningBroker } from '../broker/broker';
import { unitPrefix } from '../shared/contracts/topics';

export const VERSION: string = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')).version;

export interface Stack {
  url: string;
  db: Db;
  broker: RunningBroker;
  http: Server;
  log: Logger;
  stop(): Promise<void>;
}

export class StartupError extends Error {}

/** Wires database, broker and HTTP server in one process (the ingest subscribes to the broker in-process). */
export async function startStack(config: Config, log: Logger = pino({ level: config.logLevel })): Promise<Stack> {
  const db = createDb(config.db);
  try {
    await db.raw('SELECT 1');
  } catch (err) {
    await db.destroy();
    throw new StartupError(describeDbError(err, config.db));
  }
  const users = new UserRepository(db);
  const units = new UnitRepository(db);
  const audit = new AuditRepository(db);
  const auth = new AuthService(users, audit, new SignInLimiter(config.signInLimitPerMinute, Date.now), {
    secret: config.sessionSecret ?? randomBytes(32).toString('hex'),
    sessionHours: config.sessionHours,
  });
  const admin = new AdminService({ users, owners: new OwnerRepository(db), sites: new SiteRepository(db), units, audit }, config.bcryptCost);

  const broker = await startBroker({
    host: config.broker.host,
    port: config.broker.port,
    unitPrefix,
    authenticate: async (username, password): Promise<Principal | null> => {
      const u = await units.findCredentials(username);
      if (!u || u.disabled || !deviceSecretMatches(password, u.device_secret_hash)) return null;
      return { kind: 'unit', serial: u.serial };
    },
  }).catch(async (err) => {
    await db.destroy();
    throw new StartupError(`Cannot start the MQTT broker on ${config.broker.host}:${config.broker.port}: ${(err as Error).message}. Set BW_BROKER_PORT to a free port.`);
  });

  const app = createApp({
    db, log, auth, admin, version: VERSION, webDir: config.webDir,
    broker: () => ({ ok: true, port: broker.port, clients: broker.clients() }),
  });
  const http = createServer(app);
  await new Promise<void>((res, rej) => {
    http.once('error', (err) => rej(new StartupError(`Cannot listen on ${config.host}:${config.port}: ${err.message}. Set BW_PORT to a free port.`)));
    http.listen(config.port, config.host, () => res());
  });
  const { port } = http.address() as AddressInfo;
  const url = `http://${config.host}:${port}`;

  let stopping: Promise<void> | undefined;
  const stop = () =>
    (stopping ??= (async () => {
      http.closeAllConnections();
      await new Promise<void>((res) => http.close(() => res()));
      await broker.close();
      await db.destroy();
    })());
  return { url, db, broker, http, log, stop };
}
