import type { Db } from './db';
import type { Owner } from '../../shared/contracts/api';

export class OwnerRepository {
  constructor(private readonly db: Db) {}

  async list(): Promise<Owner[]> {
    const rows = await this.db('owners as o')
      .leftJoin('sites as s', 's.owner_id', 'o.id')
      .groupBy('o.id', 'o.name', 'o.contact_email')
      .orderBy('o.name')
      .select('o.id', 'o.name', 'o.contact_email', this.db.raw('COUNT(s.id) as site_count'));
    return rows.map((r) => ({ id: r.id, name: r.name, contactEmail: r.contact_email, siteCount: Number(r.site_count) }));
  }

  async findById(id: number): Promise<Owner | undefined> {
    return (await this.list()).find((o) => o.id === id);
  }

  async findByName(name: string): Promise<{ id: number } | undefined> {
    return this.db('owners').where({ name }).first('id');
  }

  async insert(o: { name: string; contactEmail: string | null }): Promise<number> {
    const [id] = await this.db('owners').insert({ name: o.name, contact_email: o.contactEmail });
    return id as number;
  }

  async update(id: number, p: { name?: string; contactEmail?: string | null }): Promise<void> {
    const patch = {
      ...(p.name !== undefined ? { name: p.name } : {}),
      ...(p.contactEmail !== undefined ? { contact_email: p.contactEmail } : {}),
    };
    if (Object.keys(patch).length) await this.db('owners').where({ id }).update(patch);
  }
}
