import type { Db } from './db';
import type { Site, SiteInput } from '../../shared/contracts/api';

interface SiteRow {
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

  async insert(site: SiteInput): Promise<number> {
    const [id] = await this.db('sites').insert(siteRow(site));
    return id as number;
  }

  async update(id: number, patch: Partial<SiteInput>): Promise<void> {
    const row = siteRow(patch);
    if (Object.keys(row).length) await this.db('sites').where({ id }).update(row);
  }
}

/** The columns of the fields given. */
function siteRow(i: Partial<SiteInput>): Partial<Omit<SiteRow, 'id'>> {
  const r: Record<string, unknown> = {};
  if (i.ownerId !== undefined) r['owner_id'] = i.ownerId;
  if (i.name !== undefined) r['name'] = i.name;
  if (i.latitudeDeg !== undefined) r['latitude_deg'] = i.latitudeDeg;
  if (i.longitudeDeg !== undefined) r['longitude_deg'] = i.longitudeDeg;
  if (i.elevationM !== undefined) r['elevation_m'] = i.elevationM;
  if (i.timeZone !== undefined) r['time_zone'] = i.timeZone;
  if (i.albedo !== undefined) r['albedo'] = i.albedo;
  if (i.indoor !== undefined) r['indoor'] = i.indoor;
  return r;
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
