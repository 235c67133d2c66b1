import type { Db } from './db';
import type { StoredUser } from './user-repository';

export interface SessionRow {
  id: string;
  user_id: number;
  created_at: Date;
  expires_at: Date;
  revoked_at: Date | null;
}

/** A session that has not ended, with the user it belongs to. */
export type LiveSession = Pick<StoredUser, 'id' | 'email' | 'name' | 'role' | 'ownerId' | 'disabled'> & { sessionId: string };

export class SessionRepository {
  constructor(private readonly db: Db) {}

  async insert(s: { id: string; userId: number; expiresAt: Date }): Promise<void> {
    await this.db('sessions').insert({ id: s.id, user_id: s.userId, expires_at: s.expiresAt } satisfies Pick<
      SessionRow,
      'id' | 'user_id' | 'expires_at'
    >);
  }

  /** The sessions among `ids` that are neither revoked nor past their end, each with its user (disabled users included). */
  async findLive(ids: readonly string[], now: Date): Promise<LiveSession[]> {
    const out: LiveSession[] = [];
    for (let i = 0; i < ids.length; i += 500) {
      const rows = await this.db('sessions as s')
        .join('users as u', 'u.id', 's.user_id')
        .whereIn('s.id', ids.slice(i, i + 500))
        .whereNull('s.revoked_at')
        .where('s.expires_at', '>', now)
        .select('s.id as session_id', 'u.id', 'u.email', 'u.name', 'u.role', 'u.owner_id', 'u.disabled');
      for (const r of rows)
        out.push({
          sessionId: r.session_id,
          id: r.id,
          email: r.email,
          name: r.name,
          role: r.role,
          ownerId: r.owner_id,
          disabled: Boolean(r.disabled),
        });
    }
    return out;
  }

  /** Ends one session; returns whether it was still open. */
  async revoke(id: string, now: Date): Promise<boolean> {
    return (await this.db('sessions').where({ id }).whereNull('revoked_at').update({ revoked_at: now })) > 0;
  }

  /** Ends every open session of a user, except `exceptId` when given; returns how many were open. */
  async revokeForUser(userId: number, now: Date, exceptId?: string): Promise<number> {
    const q = this.db('sessions').where({ user_id: userId }).whereNull('revoked_at').where('expires_at', '>', now);
    if (exceptId) q.whereNot({ id: exceptId });
    return q.update({ revoked_at: now });
  }

  /** Forgets a user's sessions that have ended (revoked or expired): they can never be used again. */
  async deleteEnded(userId: number, now: Date): Promise<void> {
    await this.db('sessions')
      .where({ user_id: userId })
      .andWhere((w) => w.whereNotNull('revoked_at').orWhere('expires_at', '<=', now))
      .delete();
  }
}
