import type { Db } from './db';
import type { Role, User } from '../../shared/contracts/api';

interface UserRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  owner_id: number | null;
  password_hash: string;
  disabled: number | boolean;
  created_at: Date;
}

/** A user as stored, with the password hash (never leaves the server). */
export interface StoredUser {
  id: number;
  email: string;
  name: string;
  role: Role;
  ownerId: number | null;
  passwordHash: string;
  disabled: boolean;
  createdAt: Date;
}

export type NewUser = Pick<StoredUser, 'email' | 'name' | 'role' | 'ownerId' | 'passwordHash'>;
export type UserPatch = Partial<Pick<StoredUser, 'name' | 'role' | 'ownerId' | 'passwordHash' | 'disabled'>>;

export const toUser = (u: StoredUser): User => ({
  id: u.id,
  email: u.email,
  name: u.name,
  role: u.role,
  ownerId: u.ownerId,
  disabled: u.disabled,
  createdAt: u.createdAt.toISOString(),
});

const storedUser = (r: UserRow): StoredUser => ({
  id: r.id,
  email: r.email,
  name: r.name,
  role: r.role,
  ownerId: r.owner_id,
  passwordHash: r.password_hash,
  disabled: Boolean(r.disabled),
  createdAt: r.created_at,
});

export class UserRepository {
  constructor(private readonly db: Db) {}

  async findByEmail(email: string): Promise<StoredUser | undefined> {
    const r = await this.db<UserRow>('users').where({ email }).first();
    return r ? storedUser(r) : undefined;
  }

  async findById(id: number): Promise<StoredUser | undefined> {
    const r = await this.db<UserRow>('users').where({ id }).first();
    return r ? storedUser(r) : undefined;
  }

  async list(): Promise<StoredUser[]> {
    return (await this.db<UserRow>('users').orderBy('name')).map(storedUser);
  }

  async insert(u: NewUser): Promise<number> {
    const [id] = await this.db('users').insert({
      email: u.email,
      name: u.name,
      role: u.role,
      owner_id: u.ownerId,
      password_hash: u.passwordHash,
    });
    return id as number;
  }

  async update(id: number, p: UserPatch): Promise<void> {
    const patch: Partial<UserRow> = {
      ...(p.name !== undefined ? { name: p.name } : {}),
      ...(p.role !== undefined ? { role: p.role } : {}),
      ...(p.ownerId !== undefined ? { owner_id: p.ownerId } : {}),
      ...(p.disabled !== undefined ? { disabled: p.disabled } : {}),
      ...(p.passwordHash !== undefined ? { password_hash: p.passwordHash } : {}),
    };
    if (Object.keys(patch).length) await this.db('users').where({ id }).update(patch);
  }
}
