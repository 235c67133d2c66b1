import type {
  CreateUserRequest,
  Owner,
  OwnerInput,
  Site,
  SiteInput,
  Unit,
  UnitInput,
  UpdateUserRequest,
  User,
} from '../../shared/contracts/api';
import { badRequest, conflict, notFound } from '../errors/app-error';
import type { AuditRepository } from '../data/audit-repository';
import type { OwnerRepository } from '../data/owner-repository';
import type { SiteRepository } from '../data/site-repository';
import type { UnitRepository } from '../data/unit-repository';
import { toUser, type UserRepository } from '../data/user-repository';
import { scopeOf, type Caller } from './caller';
import { hashDeviceSecret, newDeviceSecret } from './device-secret';
import type { Passwords } from './passwords';
import type { SessionRevoker } from './auth-service';

export interface AdminRepositories {
  users: UserRepository;
  owners: OwnerRepository;
  sites: SiteRepository;
  units: UnitRepository;
  audit: AuditRepository;
}

/** What an admin change did to a unit, for whoever keeps copies of unit facts (the unit directory, broker sessions). */
export interface UnitChange {
  /** The unit's MQTT credentials changed: a new device secret, or a new serial (its user name). */
  credentialsChanged: boolean;
  /** Whether the unit is disabled now. */
  disabled: boolean;
  /** The unit's serial now. */
  serial: string;
  /** The serial before this change, when the change renamed the unit. */
  previousSerial?: string;
}

export interface AdminListeners {
  /**
   * Called after every committed change of a unit (create, update including a move to another site, disable, secret
   * rotation) and for every unit of a site whose details or owner changed. The request waits for it, so the change is in
   * force everywhere when the answer goes out.
   */
  onUnitChanged?: (unitId: number, change: UnitChange) => void | Promise<void>;
}

/** People, owners, sites and units: reads scoped to the caller, writes (admin only, checked by routes) audited. */
export class AdminService {
  constructor(
    private readonly repo: AdminRepositories,
    private readonly passwords: Passwords,
    /** Ends a user's sessions when their access changes (disabled, role, owner, password). */
    private readonly sessions: SessionRevoker,
    private readonly listeners: AdminListeners = {},
  ) {}

  private async unitChanged(unitId: number, change: UnitChange): Promise<void> {
    await this.listeners.onUnitChanged?.(unitId, change);
  }

  // ---- people
  async listUsers(): Promise<User[]> {
    return (await this.repo.users.list()).map(toUser);
  }

  async createUser(by: Caller, input: CreateUserRequest): Promise<User> {
    const email = input.email.toLowerCase();
    if (await this.repo.users.findByEmail(email)) throw conflict('That e-mail is already in use.', { email: 'Already in use.' });
    const ownerId = await this.checkOwnerLink(input.role, input.ownerId ?? null);
    const id = await this.repo.users.insert({
      email,
      name: input.name,
      role: input.role,
      ownerId,
      passwordHash: await this.passwords.hash(input.password),
    });
    await this.repo.audit.append({ userId: by.id, action: 'user-create', target: `user:${id}`, detail: { email, role: input.role } });
    return this.getUser(id);
  }

  async updateUser(by: Caller, id: number, patch: UpdateUserRequest): Promise<User> {
    const current = await this.repo.users.findById(id);
    if (!current) throw notFound('User');
    const role = patch.role ?? current.role;
    const ownerId = await this.checkOwnerLink(
      role,
      patch.ownerId !== undefined ? patch.ownerId : role === 'owner' ? current.ownerId : null,
    );
    if (id === by.id && (patch.disabled || (patch.role && patch.role !== 'admin'))) {
      throw badRequest(
        'You cannot disable yourself or remove your own admin role.',
        patch.disabled ? { disabled: 'Not for your own account.' } : { role: 'Not for your own account.' },
      );
    }
    await this.repo.users.update(id, {
      ...(patch.name !== undefined ? { name: patch.name } : {}),
      role,
      ownerId,
      ...(patch.disabled !== undefined ? { disabled: patch.disabled } : {}),
    });
    await this.repo.audit.append({ userId: by.id, action: 'user-update', target: `user:${id}`, detail: patch });
    // Whoever holds a session of this user was let in as the old role/owner: they sign in again.
    const disabled = patch.disabled === true && !current.disabled;
    if (disabled || role !== current.role || ownerId !== current.ownerId) await this.sessions.endSessionsOf(id);
    return this.getUser(id);
  }

  async resetPassword(by: Caller, id: number, password: string): Promise<void> {
    if (!(await this.repo.users.findById(id))) throw notFound('User');
    await this.repo.users.update(id, { passwordHash: await this.passwords.hash(password) });
    await this.sessions.endSessionsOf(id);
    await this.repo.audit.append({ userId: by.id, action: 'user-password-reset', target: `user:${id}` });
  }

  private async getUser(id: number): Promise<User> {
    return toUser((await this.repo.users.findById(id))!);
  }

  /** Owner users must name an existing owner; other roles must not have one. */
  private async checkOwnerLink(role: string, ownerId: number | null): Promise<number | null> {
    if (role !== 'owner') {
      if (ownerId !== null) throw badRequest('Only owner users belong to an owner.', { ownerId: 'Leave empty for this role.' });
      return null;
    }
    if (ownerId === null) throw badRequest('An owner user must belong to an owner.', { ownerId: 'Choose the owner.' });
    if (!(await this.repo.owners.findById(ownerId))) throw badRequest('No such owner.', { ownerId: 'No such owner.' });
    return ownerId;
  }

  // ---- owners
  listOwners(): Promise<Owner[]> {
    return this.repo.owners.list();
  }

  /** One owner: staff see every owner, an owner user only its own (404 otherwise). */
  async getOwner(c: Caller, id: number): Promise<Owner> {
    const o = c.role === 'owner' && c.ownerId !== id ? undefined : await this.repo.owners.findById(id);
    if (!o) throw notFound('Owner');
    return o;
  }

  async createOwner(by: Caller, input: OwnerInput): Promise<Owner> {
    if (await this.repo.owners.findByName(input.name)) throw conflict('An owner with that name exists.', { name: 'Already in use.' });
    const id = await this.repo.owners.insert({ name: input.name, contactEmail: input.contactEmail ?? null });
    await this.repo.audit.append({ userId: by.id, action: 'owner-create', target: `owner:${id}`, detail: input });
    return (await this.repo.owners.findById(id))!;
  }

  async updateOwner(by: Caller, id: number, patch: Partial<OwnerInput>): Promise<Owner> {
    if (!(await this.repo.owners.findById(id))) throw notFound('Owner');
    if (patch.name) {
      const other = await this.repo.owners.findByName(patch.name);
      if (other && other.id !== id) throw conflict('An owner with that name exists.', { name: 'Already in use.' });
    }
    await this.repo.owners.update(id, {
      ...(patch.name !== undefined ? { name: patch.name } : {}),
      ...(patch.contactEmail !== undefined ? { contactEmail: patch.contactEmail } : {}),
    });
    await this.repo.audit.append({ userId: by.id, action: 'owner-update', target: `owner:${id}`, detail: patch });
    return (await this.repo.owners.findById(id))!;
  }

  // ---- sites
  listSites(c: Caller): Promise<Site[]> {
    return this.repo.sites.list(scopeOf(c));
  }

  async getSite(c: Caller, id: number): Promise<Site> {
    const s = await this.repo.sites.findById(id, scopeOf(c));
    if (!s) throw notFound('Site');
    return s;
  }

  async createSite(by: Caller, input: SiteInput): Promise<Site> {
    await this.checkSite(input);
    const id = await this.repo.sites.insert(input);
    await this.repo.audit.append({ userId: by.id, action: 'site-create', target: `site:${id}`, detail: input });
    return this.getSite(by, id);
  }

  async updateSite(by: Caller, id: number, patch: Partial<SiteInput>): Promise<Site> {
    await this.getSite(by, id);
    await this.checkSite(patch, id);
    await this.repo.sites.update(id, patch);
    await this.repo.audit.append({ userId: by.id, action: 'site-update', target: `site:${id}`, detail: patch });
    // Owner and time zone of the site's units follow it. All at once: listeners that reload can then share one reload.
    const units = await this.repo.units.list({ ownerId: null }, id);
    await Promise.all(units.map((u) => this.unitChanged(u.id, { credentialsChanged: false, disabled: u.disabled, serial: u.serial })));
    return this.getSite(by, id);
  }

  private async checkSite(input: Partial<SiteInput>, id?: number): Promise<void> {
    if (input.ownerId !== undefined && !(await this.repo.owners.findById(input.ownerId)))
      throw badRequest('No such owner.', { ownerId: 'No such owner.' });
    if (input.name !== undefined) {
      const other = await this.repo.sites.findByName(input.name);
      if (other && other.id !== id) throw conflict('A site with that name exists.', { name: 'Already in use.' });
    }
  }

  // ---- units
  listUnits(c: Caller, siteId?: number): Promise<Unit[]> {
    return this.repo.units.list(scopeOf(c), siteId);
  }

  async getUnit(c: Caller, id: number): Promise<Unit> {
    const u = await this.repo.units.findById(id, scopeOf(c));
    if (!u) throw notFound('Unit');
    return u;
  }

  async createUnit(by: Caller, input: UnitInput): Promise<{ unit: Unit; deviceSecret: string }> {
    await this.checkUnit(input);
    const deviceSecret = newDeviceSecret();
    const id = await this.repo.units.insert({ ...input, deviceSecretHash: hashDeviceSecret(deviceSecret) });
    await this.repo.audit.append({ userId: by.id, action: 'unit-create', target: `unit:${id}`, detail: input });
    await this.unitChanged(id, { credentialsChanged: false, disabled: input.disabled ?? false, serial: input.serial });
    return { unit: await this.getUnit(by, id), deviceSecret };
  }

  async updateUnit(by: Caller, id: number, patch: Partial<UnitInput>): Promise<Unit> {
    const current = await this.getUnit(by, id);
    await this.checkUnit({ ...current, ...patch }, id);
    await this.repo.units.update(id, patch);
    await this.repo.audit.append({ userId: by.id, action: 'unit-update', target: `unit:${id}`, detail: patch });
    const renamed = patch.serial !== undefined && patch.serial !== current.serial;
    await this.unitChanged(id, {
      credentialsChanged: renamed,
      disabled: patch.disabled ?? current.disabled,
      serial: patch.serial ?? current.serial,
      ...(renamed ? { previousSerial: current.serial } : {}),
    });
    return this.getUnit(by, id);
  }

  /**
   * A unit carried out a `configure` sent by `byUserId`: its record takes the settings the unit keeps a copy of (today
   * the detector tilt), audited as `unit-configured` with old → new, and every copy of the unit is refreshed.
   */
  async recordConfigured(unitId: number, config: { detectorTiltDeg?: number }, byUserId: number, commandId: string): Promise<void> {
    if (config.detectorTiltDeg === undefined) return;
    const current = await this.repo.units.findById(unitId, { ownerId: null });
    if (!current || current.detectorTiltDeg === config.detectorTiltDeg) return;
    await this.repo.units.update(unitId, { detectorTiltDeg: config.detectorTiltDeg });
    await this.repo.audit.append({
      userId: byUserId,
      action: 'unit-configured',
      target: `unit:${unitId}`,
      detail: { commandId, detectorTiltDeg: { from: current.detectorTiltDeg, to: config.detectorTiltDeg } },
    });
    await this.unitChanged(unitId, { credentialsChanged: false, disabled: current.disabled, serial: current.serial });
  }

  async rotateDeviceSecret(by: Caller, id: number): Promise<{ deviceSecret: string }> {
    const unit = await this.getUnit(by, id);
    const deviceSecret = newDeviceSecret();
    await this.repo.units.update(id, { deviceSecretHash: hashDeviceSecret(deviceSecret) });
    await this.repo.audit.append({ userId: by.id, action: 'unit-secret-rotate', target: `unit:${id}` });
    await this.unitChanged(id, { credentialsChanged: true, disabled: unit.disabled, serial: unit.serial });
    return { deviceSecret };
  }

  private async checkUnit(u: UnitInput, id?: number): Promise<void> {
    const fields: Record<string, string> = {};
    if (u.tiltMinDeg >= u.tiltMaxDeg) fields['tiltMaxDeg'] = 'Must be greater than the minimum tilt.';
    if (u.azimuthMinDeg >= u.azimuthMaxDeg) fields['azimuthMaxDeg'] = 'Must be greater than the minimum azimuth.';
    if (Object.keys(fields).length) throw badRequest('The axis limits are inconsistent.', fields);
    if (!(await this.repo.sites.findById(u.siteId, { ownerId: null }))) throw badRequest('No such site.', { siteId: 'No such site.' });
    const other = await this.repo.units.findBySerial(u.serial);
    if (other && other.id !== id) throw conflict('A unit with that serial exists.', { serial: 'Already in use.' });
  }
}
