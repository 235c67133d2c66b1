import type { Db } from './db';
import type { HolderKind, HoldView } from '../../shared/contracts/holds';

export interface HoldRow {
  id: number;
  unit_id: number;
  holder_kind: HolderKind;
  holder_id: number;
  note: string | null;
  placed_at: Date;
  placed_by: number;
  command_id: string | null;
  released_at: Date | null;
  released_by: number | null;
  release_reason: string | null;
}

type JoinedRow = HoldRow & { holder_name: string | null; placed_by_name: string; released_by_name: string | null };

/** Maintenance holds; a hold is in force while `released_at` is null. */
export class HoldRepository {
  constructor(private readonly db: Db) {}

  /** The unit's holds in force, oldest first. */
  async active(unitId: number): Promise<HoldView[]> {
    return (await this.base().where('h.unit_id', unitId).whereNull('h.released_at').orderBy('h.id')).map(toView);
  }

  /** Every hold in force in the fleet, oldest first (for the in-memory unit directory). */
  async allActive(): Promise<HoldView[]> {
    return (await this.base().whereNull('h.released_at').orderBy('h.id')).map(toView);
  }

  /** The unit's latest released holds, newest release first. */
  async released(unitId: number, limit = 20): Promise<HoldView[]> {
    return (
      await this.base()
        .where('h.unit_id', unitId)
        .whereNotNull('h.released_at')
        .orderBy([
          { column: 'h.released_at', order: 'desc' },
          { column: 'h.id', order: 'desc' },
        ])
        .limit(limit)
    ).map(toView);
  }

  async get(id: number): Promise<HoldView | undefined> {
    const r = await this.base().where('h.id', id).first();
    return r ? toView(r) : undefined;
  }

  async insert(h: {
    unitId: number;
    holderKind: HolderKind;
    holderId: number;
    note: string | null;
    placedAt: Date;
    placedBy: number;
    commandId: string | null;
  }): Promise<number> {
    const row: Omit<HoldRow, 'id' | 'released_at' | 'released_by' | 'release_reason'> = {
      unit_id: h.unitId,
      holder_kind: h.holderKind,
      holder_id: h.holderId,
      note: h.note,
      placed_at: h.placedAt,
      placed_by: h.placedBy,
      command_id: h.commandId,
    };
    const [id] = await this.db('unit_holds').insert(row);
    return id as number;
  }

  /** Releases a hold still in force; false when it was not (already released, or no such hold). */
  async release(id: number, r: { releasedAt: Date; releasedBy: number; releaseReason: string | null }): Promise<boolean> {
    return (
      (await this.db('unit_holds')
        .where({ id })
        .whereNull('released_at')
        .update({ released_at: r.releasedAt, released_by: r.releasedBy, release_reason: r.releaseReason })) === 1
    );
  }

  private base() {
    return this.db('unit_holds as h')
      .leftJoin('users as hu', (j) => j.on('hu.id', 'h.holder_id').andOnVal('h.holder_kind', 'person'))
      .join('users as pu', 'pu.id', 'h.placed_by')
      .leftJoin('users as ru', 'ru.id', 'h.released_by')
      .select(
        'h.id',
        'h.unit_id',
        'h.holder_kind',
        'h.holder_id',
        'h.note',
        'h.placed_at',
        'h.placed_by',
        'h.command_id',
        'h.released_at',
        'h.released_by',
        'h.release_reason',
        'hu.name as holder_name',
        'pu.name as placed_by_name',
        'ru.name as released_by_name',
      );
  }
}

function toView(r: JoinedRow): HoldView {
  return {
    id: r.id,
    unitId: r.unit_id,
    holder: {
      kind: r.holder_kind,
      id: r.holder_id,
      name: r.holder_kind === 'ticket' ? `Ticket ${r.holder_id}` : (r.holder_name ?? `User ${r.holder_id}`),
    },
    note: r.note,
    placedAt: r.placed_at.toISOString(),
    placedBy: { id: r.placed_by, name: r.placed_by_name },
    releasedAt: r.released_at ? r.released_at.toISOString() : null,
    releasedBy: r.released_by !== null ? { id: r.released_by, name: r.released_by_name ?? `User ${r.released_by}` } : null,
    releaseReason: r.release_reason,
  };
}
