import type { Db } from './db';
import type { CommandStatus, CommandView } from '../../shared/contracts/live';
import { HOLD_COMMANDS, type CommandKind } from '../../shared/contracts/wire-format';
import { AuditRepository } from './audit-repository';
import { HoldRepository } from './hold-repository';

/** A command as stored. */
export interface StoredCommand {
  id: string;
  unitId: number;
  kind: CommandKind;
  params: Record<string, unknown> | null;
  status: CommandStatus;
  reason: string | null;
  issuedBy: number;
  issuedAt: Date;
  sentAt: Date | null;
  ackedAt: Date | null;
  finishedAt: Date | null;
}

interface CommandRow {
  id: string;
  unit_id: number;
  kind: CommandKind;
  /** JSON text when written; the driver may hand it back parsed. */
  params: string | Record<string, unknown> | null;
  status: CommandStatus;
  reason: string | null;
  issued_by: number;
  issued_at: Date;
  sent_at: Date | null;
  acked_at: Date | null;
  finished_at: Date | null;
  /** Issue order (auto-increment): breaks ties between commands issued within the same millisecond. */
  seq?: number;
}

/** The statuses of a command still waiting for the unit. */
const OPEN: CommandStatus[] = ['queued', 'sent', 'acknowledged'];
/** Longest stored reason (the column's width). */
const REASON_MAX = 200;

export class CommandRepository {
  constructor(private readonly db: Db) {}

  async insert(c: StoredCommand): Promise<void> {
    const row: CommandRow = {
      id: c.id,
      unit_id: c.unitId,
      kind: c.kind,
      params: c.params ? JSON.stringify(c.params) : null,
      status: c.status,
      reason: clip(c.reason),
      issued_by: c.issuedBy,
      issued_at: c.issuedAt,
      sent_at: c.sentAt,
      acked_at: c.ackedAt,
      finished_at: c.finishedAt,
    };
    await this.db('commands').insert(row);
  }

  async update(id: string, p: Partial<Pick<StoredCommand, 'status' | 'reason' | 'sentAt' | 'ackedAt' | 'finishedAt'>>): Promise<void> {
    const patch: Partial<CommandRow> = {
      ...(p.status !== undefined ? { status: p.status } : {}),
      ...(p.reason !== undefined ? { reason: clip(p.reason) } : {}),
      ...(p.sentAt !== undefined ? { sent_at: p.sentAt } : {}),
      ...(p.ackedAt !== undefined ? { acked_at: p.ackedAt } : {}),
      ...(p.finishedAt !== undefined ? { finished_at: p.finishedAt } : {}),
    };
    await this.db('commands').where({ id }).update(patch);
  }

  async get(id: string): Promise<CommandView | undefined> {
    const r = await this.base().where('c.id', id).first();
    return r ? toView(r) : undefined;
  }

  /** The stored row of one command, as the unit's answers need it. */
  async row(id: string): Promise<StoredCommand | undefined> {
    const r = await this.db<CommandRow>('commands').where({ id }).first();
    return r ? stored(r) : undefined;
  }

  async listForUnit(unitId: number, limit = 100): Promise<CommandView[]> {
    return (
      await this.base()
        .where('c.unit_id', unitId)
        .orderBy([
          { column: 'c.issued_at', order: 'desc' },
          { column: 'c.seq', order: 'desc' },
        ])
        .limit(limit)
    ).map(toView);
  }

  /** Commands still waiting for the unit (queued, or sent and not yet answered), in the order issued. */
  async open(): Promise<StoredCommand[]> {
    return (
      await this.db<CommandRow>('commands')
        .whereIn('status', OPEN)
        .orderBy([{ column: 'issued_at' }, { column: 'seq' }])
    ).map(stored);
  }

  /** A unit's queued commands in the order issued: the order they go out in. */
  async queuedForUnit(unitId: number): Promise<StoredCommand[]> {
    return (
      await this.db<CommandRow>('commands')
        .where({ unit_id: unitId, status: 'queued' })
        .orderBy([{ column: 'issued_at' }, { column: 'seq' }])
    ).map(stored);
  }

  /** Ends the unit's queued commands of these kinds as cancelled, with the reason; returns their ids. */
  async cancelQueued(unitId: number, kinds: readonly CommandKind[], reason: string, at: Date): Promise<string[]> {
    const rows: { id: string }[] = await this.db('commands')
      .where({ unit_id: unitId, status: 'queued' })
      .whereIn('kind', kinds)
      .select('id');
    if (rows.length)
      await this.db('commands')
        .whereIn(
          'id',
          rows.map((r) => r.id),
        )
        .update({ status: 'cancelled', reason: clip(reason), finished_at: at });
    return rows.map((r) => r.id);
  }

  /**
   * The latest hold or release-hold meant for the unit itself (queued, or sent at some point), newest first by issue
   * order. Requests that changed nothing on the unit (a second hold, a release with other holds left) are not among them.
   */
  async lastHoldDelivery(unitId: number): Promise<StoredCommand | undefined> {
    const r = await this.db<CommandRow>('commands')
      .where({ unit_id: unitId })
      .whereIn('kind', HOLD_COMMANDS)
      .andWhere((q) => q.where('status', 'queued').orWhereNotNull('sent_at'))
      .orderBy([
        { column: 'issued_at', order: 'desc' },
        { column: 'seq', order: 'desc' },
      ])
      .first();
    return r ? stored(r) : undefined;
  }

  private base() {
    return this.db('commands as c').join('users as u', 'u.id', 'c.issued_by').select('c.*', 'u.name as issued_by_name');
  }
}

/** Commands, holds and the audit trail of one unit, changed together in one transaction. */
export interface CommandTx {
  commands: CommandRepository;
  holds: HoldRepository;
  audit: AuditRepository;
}

/** The stores the command service writes, and the transaction that keeps their changes for one unit together. */
export class CommandStore {
  readonly commands: CommandRepository;
  readonly holds: HoldRepository;
  readonly audit: AuditRepository;

  constructor(private readonly db: Db) {
    this.commands = new CommandRepository(db);
    this.holds = new HoldRepository(db);
    this.audit = new AuditRepository(db);
  }

  /**
   * Runs `fn` in one transaction that first locks the unit's row, so holds and commands of one unit change one request
   * at a time: a go-to checked against the holds cannot slip in beside a hold being placed. All or nothing is written.
   */
  locked<T>(unitId: number, fn: (tx: CommandTx) => Promise<T>): Promise<T> {
    return this.db.transaction(async (trx) => {
      await trx('units').where({ id: unitId }).forUpdate().first('id');
      return fn({ commands: new CommandRepository(trx), holds: new HoldRepository(trx), audit: new AuditRepository(trx) });
    });
  }
}

const clip = (s: string | null | undefined) => (s && s.length > REASON_MAX ? `${s.slice(0, REASON_MAX - 1)}…` : (s ?? null));
const iso = (d: Date | null) => (d ? d.toISOString() : null);
const paramsOf = (p: CommandRow['params']) => (p ? (typeof p === 'string' ? JSON.parse(p) : p) : null) as Record<string, unknown> | null;

function stored(r: CommandRow): StoredCommand {
  return {
    id: r.id,
    unitId: r.unit_id,
    kind: r.kind,
    params: paramsOf(r.params),
    status: r.status,
    reason: r.reason,
    issuedBy: r.issued_by,
    issuedAt: r.issued_at,
    sentAt: r.sent_at,
    ackedAt: r.acked_at,
    finishedAt: r.finished_at,
  };
}

function toView(r: CommandRow & { issued_by_name: string }): CommandView {
  return {
    id: r.id,
    unitId: r.unit_id,
    kind: r.kind,
    params: paramsOf(r.params),
    status: r.status,
    reason: r.reason,
    issuedBy: { id: r.issued_by, name: r.issued_by_name },
    issuedAt: r.issued_at.toISOString(),
    sentAt: iso(r.sent_at),
    ackedAt: iso(r.acked_at),
    finishedAt: iso(r.finished_at),
    expiresAt: null,
  };
}
