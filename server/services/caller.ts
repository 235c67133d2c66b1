import type { Role } from '../../shared/contracts/api';
import type { SiteScope } from '../data/site-repository';

/** The signed-in person a request acts for. */
export interface Caller {
  id: number;
  role: Role;
  ownerId: number | null;
}

/** Owner users see their own owner's sites only; everyone else sees the fleet. */
export const scopeOf = (c: Caller): SiteScope => ({ ownerId: c.role === 'owner' ? (c.ownerId ?? -1) : null });
