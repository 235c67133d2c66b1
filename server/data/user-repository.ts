import type { Db } from './db';
import type { Role, User } from '../../shared/contracts/api';

export interface UserRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  owner_id: number | null;
  password_hash: string;
  disabled: number | boolean;
  created_at: Date;
}

export const toUser = (r: UserRow): User => ({
  id: r.id,
  email: r.email,
  name: r.name,
  role: r.role,
  ownerId: r.owner_id,
  disabled: Boolean(r.disabled),
  createdAt: r.created_at.toISOString(),
});

export class UserRepository {
  constructor(private readonly db: Db) {}

  findByEmail(email: string): Promise<UserRow | undefined> {
    return this.db<UserRow>('users').where({ email }).first();
  }

  findById(id: number): Promise<UserRow | undefined> {
    return this.db<UserRow>('users').where({ id }).first();
  }

  list(): Promise<UserRow[]> {
    return this.db<UserRow>('users').orderBy('name');
  }

  async insert(row: Omit<UserRow, 'id' | 'created_at' | 'disabled'>): Promise<number> {
    const [id] = await this.db('users').insert(row);
    return id as number;
  }

  async update(id: number, patch: Partial<Omit<UserRow, 'id' | 'created_at'>>): Promise<void> {
    if (Object.keys(patch).length) await this.db('users').where({ id }).update(patch);
  }
}
