import type { Db } from './db';
import type { CommandStatus, CommandView } from '../../shared/contracts/live';
import type { CommandKind } from '../../shared/contracts/wire';

export interface CommandRow {
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
}

export class CommandRepository {
  constructor(private readonly db: Db) {}

  async insert(row: CommandRow): Promise<void> {
    await this.db('commands').insert(row);
  }

  async update(id: string, patch: Partial<CommandRow>): Promise<void> {
    await this.db('commands').where({ id }).update(patch);
  }

  async get(id: string): Promise<CommandView | undefined> {
    const r = await this.base().where('c.id', id).first();
    return r ? toView(r) : undefined;
  }

  async listForUnit(unitId: number, limit = 100): Promise<CommandView[]> {
    return (await this.base().where('c.unit_id', unitId).orderBy('c.issued_at', 'desc').limit(limit)).map(toView);
  }

  /** Commands still waiting for the unit: queued, or sent and not yet answered. */
  async open(): Promise<CommandRow[]> {
    return this.db<CommandRow>('commands').whereIn('status', ['queued', 'sent', 'acknowledged']);
  }

  private base() {
    return this.db('commands as c').join('users as u', 'u.id', 'c.issued_by').select('c.*', 'u.name as issued_by_name');
  }
}

const iso = (d: Date | null) => (d ? d.toISOString() : null);

function toView(r: CommandRow & { issued_by_name: string }): CommandView {
  return {
    id: r.id, unitId: r.unit_id, kind: r.kind,
    params: r.params ? (typeof r.params === 'string' ? JSON.parse(r.params) : r.params) : null,
    status: r.status, reason: r.reason, issuedBy: { id: r.issued_by, name: r.issued_by_name },
    issuedAt: r.issued_at.toISOString(), sentAt: iso(r.sent_at), ackedAt: iso(r.acked_at), finishedAt: iso(r.finished_at),
  };
}
