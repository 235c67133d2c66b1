/**
 * REST contracts shared by the server and the dashboard (JSON over HTTP, `/api/...`).
 * Times are ISO 8601 strings in UTC (`...Z`); angles in degrees; power in W.
 */

export const ROLES = ['admin', 'engineer', 'technician', 'crew', 'owner'] as const;
export type Role = (typeof ROLES)[number];

/** Error body of every non-2xx answer. `fields` maps a field path (e.g. `latitudeDeg`) to its message. */
export interface ApiErrorBody {
  error: { code: string; message: string; fields?: Record<string, string> };
}

export interface Me {
  id: number;
  email: string;
  name: string;
  role: Role;
  /** Set for role `owner` only: the owner whose sites this user may see. */
  ownerId: number | null;
}

export interface SignInRequest {
  email: string;
  password: string;
}

export interface User {
  id: number;
  email: string;
  name: string;
  role: Role;
  ownerId: number | null;
  disabled: boolean;
  createdAt: string;
}

export interface CreateUserRequest {
  email: string;
  name: string;
  role: Role;
  ownerId?: number | null;
  /** At least 10 characters and at most 72 bytes in UTF-8. */
  password: string;
}

export interface UpdateUserRequest {
  name?: string;
  role?: Role;
  ownerId?: number | null;
  disabled?: boolean;
}

export interface ResetPasswordRequest {
  password: string;
}

export interface Owner {
  id: number;
  name: string;
  contactEmail: string | null;
  siteCount: number;
}

export interface OwnerInput {
  name: string;
  contactEmail?: string | null;
}

export interface Site {
  id: number;
  ownerId: number;
  ownerName: string;
  name: string;
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  /** IANA zone, e.g. `Europe/Berlin`. */
  timeZone: string;
  albedo: number;
  /** Whether the site is indoors (lamps, no sky). */
  indoor: boolean;
  unitCount: number;
}

export interface SiteInput {
  ownerId: number;
  name: string;
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  timeZone: string;
  albedo: number;
  indoor?: boolean;
}

export interface Unit {
  id: number;
  serial: string;
  siteId: number;
  siteName: string;
  ratedPowerWp: number;
  /** Tilt of each detector from the panel normal [°]. */
  detectorTiltDeg: number;
  tiltMinDeg: number;
  tiltMaxDeg: number;
  azimuthMinDeg: number;
  azimuthMaxDeg: number;
  /** Position on the site plan, metres east / north of the site origin. */
  planXM: number;
  planYM: number;
  firmware: string;
  disabled: boolean;
  /** Whether the unit carries its site's weather station (the only unit allowed to publish the site's weather). */
  weatherStation: boolean;
}

export interface UnitInput {
  serial: string;
  siteId: number;
  ratedPowerWp: number;
  detectorTiltDeg: number;
  tiltMinDeg: number;
  tiltMaxDeg: number;
  azimuthMinDeg: number;
  azimuthMaxDeg: number;
  planXM: number;
  planYM: number;
  firmware: string;
  disabled?: boolean;
  weatherStation?: boolean;
}

/** `GET /api/health`, public: whether each part works, nothing more (the reasons are in the server log). */
export interface Health {
  status: 'ok' | 'degraded';
  database: { ok: boolean };
  broker: { ok: boolean };
}

export interface ChangePasswordRequest {
  currentPassword: string;
  /** At least 10 characters and at most 72 bytes in UTF-8. */
  newPassword: string;
}
