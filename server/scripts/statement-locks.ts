/**
 * `statement-locks.ts past [--now <ISO>]`: locks the demo's past months before the server starts (start.sh, after the
 * history fill): every month of every site that is due but the newest, silently (no mail). The server's lock job then
 * locks the newest due month at its first sweep and mails that one only, so a fresh demo never mails its whole past.
 * Months locked already are left alone, so every start may run it.
 */
import { parseArgs } from 'node:util';
import pino from 'pino';
import { loadConfig } from '../config';
import { AuditRepository } from '../data/audit-repository';
import { createDb, describeDbError } from '../data/db';
import { OwnerRepository } from '../data/owner-repository';
import { SiteRepository } from '../data/site-repository';
import { StatementLockRepository } from '../data/statement-lock-repository';
import { StatementRepository } from '../data/statement-repository';
import { TicketRepository } from '../data/ticket-repository';
import { UnitRepository } from '../data/unit-repository';
import { UserRepository } from '../data/user-repository';
import { AdminService } from '../services/admin-service';
import { Passwords } from '../services/passwords';
import { StatementLockService } from '../services/statement-lock-service';
import { StatementService } from '../services/statement-service';
import { TicketService } from '../services/ticket-service';

const { values, positionals } = parseArgs({ args: process.argv.slice(2), allowPositionals: true, options: { now: { type: 'string' } } });
if (positionals[0] !== 'past') {
  console.error('usage: statement-locks.ts past [--now <ISO instant>]');
  process.exit(2);
}
const nowMs = values.now ? Date.parse(values.now) : Date.now();
if (!Number.isFinite(nowMs)) {
  console.error(`[statements] --now must be an ISO instant, got ${values.now}`);
  process.exit(2);
}

const config = loadConfig();
const db = createDb(config.db);
const log = pino({ level: 'silent' });
const now = () => nowMs;
// Reads only: the statements need a site's details and its ticket KPIs; nobody signs in, nothing moves.
const admin = new AdminService(
  {
    users: new UserRepository(db),
    owners: new OwnerRepository(db),
    sites: new SiteRepository(db),
    units: new UnitRepository(db),
    audit: new AuditRepository(db),
  },
  new Passwords(config.bcryptCost),
  { endSessionsOf: async () => undefined },
);
const refuse = async () => {
  throw new Error('the statement lock step moves no unit');
};
const tickets = new TicketService(new TicketRepository(db), admin, { holdForTicket: refuse, releaseForTicket: refuse }, log, { now });
const locks = new StatementLockRepository(db);
const statements = new StatementService(new StatementRepository(db), admin, tickets, now, locks);
const job = new StatementLockService(locks, statements, null, null, () => undefined, log, { now });

const t0 = performance.now();
try {
  const locked = await job.sweep({ leaveNewest: true });
  if (locked.length)
    console.log(
      `[statements] ${locked.length} past month${locked.length === 1 ? '' : 's'} locked silently in ${((performance.now() - t0) / 1000).toFixed(1)} s`,
    );
} catch (err) {
  console.error(`[statements] ${describeDbError(err, config.db)}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
