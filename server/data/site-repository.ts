import type { Db } from './db';
import type { Site } from '../../shared/contracts/api';

export interface SiteRow {
  id: number;
  owner_id: number;
  name: string;
  latitude_deg: number;
  longitude_deg: number;
  elevation_m: number;
  time_zone: string;
  albedo: number;
  indoor: number | boolean;
}

/** Which sites a caller may see: every site, or one owner's. */
export type SiteScope = { ownerId: number | null };

export class SiteRepository {
  constructor(private readonly db: Db) {}

  private base(scope: SiteScope) {
    const q = this.db('sites as s')
      .join('owners as o', 'o.id', 's.owner_id')
      .leftJoin('units as u', 'u.site_id', 's.id')
      .groupBy('s.id')
      .select('s.*', 'o.name as owner_name', this.db.raw('COUNT(u.id) as unit_count'))
      .orderBy('s.name');
    if (scope.ownerId !== null) q.where('s.owner_id', scope.ownerId);
    return q;
  }

  async list(scope: SiteScope): Promise<Site[]> {
    return (await this.base(scope)).map(toSite);
  }

  async findById(id: number, scope: SiteScope): Promise<Site | undefined> {
    const row = await this.base(scope).where('s.id', id).first();
    return row ? toSite(row) : undefined;
  }

  async findByName(name: string): Promise<{ id: number } | undefined> {
    return this.db('sites').where({ name }).first('id');
  }

  async insert(row: Omit<SiteRow, 'id'>): Promise<number> {
    const [id] = await this.db('sites').insert(row);
    return id as number;
  }

  async update(id: number, patch: Partial<Omit<SiteRow, 'id'>>): Promise<void> {
    if (Object.keys(patch).length) await this.db('sites').where({ id }).update(patch);
  }
}

function toSite(r: SiteRow & { owner_name: string; unit_count: number | string }): Site {
  return {
    id: r.id,
    ownerId: r.owner_id,
    ownerName: r.owner_name,
    name: r.name,
    latitudeDeg: r.latitude_deg,
    longitudeDeg: r.longitude_deg,
    elevationM: r.elevation_m,
    timeZone: r.time_zone,
    albedo: r.albedo,
    indoor: Boolean(r.indoor),
    unitCount: Number(r.unit_count),
  };
}
