import type { Db } from './db';

export interface AuditEntry {
  userId: number | null;
  action: string;
  target?: string;
  detail?: unknown;
}

export class AuditRepository {
  constructor(private readonly db: Db) {}

  async append(e: AuditEntry): Promise<void> {
    await this.db('audit_log').insert({
      user_id: e.userId,
      action: e.action,
      target: e.target ?? null,
      detail: e.detail === undefined ? null : JSON.stringify(e.detail),
    });
  }
}
