import type { AuditLogEntry, AuditPage } from '../../shared/contracts/audit';
import { alarmKindWords } from '../../shared/contracts/plain-words';
import type { AuditRepository, StoredAuditEntry, TargetNames } from '../data/audit-repository';
import { badRequest } from '../errors/app-error';
import type { Caller } from './caller';

export interface AuditListRequest {
  action?: string;
  userId?: number;
  target?: string;
  from?: string;
  to?: string;
  limit: number;
  offset: number;
}

const KINDS = ['unit', 'site', 'owner', 'user', 'alarm'] as const;
type Kind = (typeof KINDS)[number];

/** Splits `unit:12` into its kind and id; null for free-text targets (an e-mail) and unknown kinds. */
function parseTarget(target: string | null): { kind: Kind; id: number } | null {
  const m = /^([a-z]+):(\d{1,10})$/.exec(target ?? '');
  if (!m || !(KINDS as readonly string[]).includes(m[1]!)) return null;
  return { kind: m[1] as Kind, id: Number(m[2]) };
}

function labelOf(target: string | null, names: TargetNames): string | null {
  if (target === null) return null;
  const t = parseTarget(target);
  if (!t) return target;
  const missing = `${t.kind[0]!.toUpperCase()}${t.kind.slice(1)} ${t.id} (no longer exists)`;
  switch (t.kind) {
    case 'unit':
      return names.units.has(t.id) ? `Unit ${names.units.get(t.id)}` : missing;
    case 'site':
      return names.sites.has(t.id) ? `Site ${names.sites.get(t.id)}` : missing;
    case 'owner':
      return names.owners.has(t.id) ? `Owner ${names.owners.get(t.id)}` : missing;
    case 'user':
      return names.users.has(t.id) ? `Person ${names.users.get(t.id)}` : missing;
    case 'alarm': {
      const a = names.alarms.get(t.id);
      if (!a) return missing;
      const kind = alarmKindWords(a.kind).toLowerCase();
      return a.serial ? `Alarm on ${a.serial} (${kind})` : `Alarm at ${a.siteName} (${kind})`;
    }
  }
}

/** The audit trail: services record their actions here, admins read it (the route checks the role). */
export class AuditService {
  constructor(private readonly repo: AuditRepository) {}

  /** Appends one entry for an action a signed-in person took. */
  record(by: Caller, action: string, target: string | null, detail?: unknown): Promise<void> {
    return this.repo.append({ userId: by.id, action, ...(target !== null ? { target } : {}), ...(detail !== undefined ? { detail } : {}) });
  }

  async list(q: AuditListRequest): Promise<AuditPage> {
    const from = q.from === undefined ? undefined : new Date(q.from);
    const to = q.to === undefined ? undefined : new Date(q.to);
    if (from && to && !(from < to)) throw badRequest('The range is empty.', { to: 'Must be after from.' });
    const { total, rows } = await this.repo.list({ action: q.action, userId: q.userId, target: q.target, from, to }, q.limit, q.offset);
    const ids: Record<`${Kind}s`, number[]> = { units: [], sites: [], owners: [], users: [], alarms: [] };
    for (const r of rows) {
      const t = parseTarget(r.target);
      if (t) ids[`${t.kind}s`].push(t.id);
    }
    const names = await this.repo.targetNames(ids);
    return { total, limit: q.limit, offset: q.offset, entries: rows.map((r) => toEntry(r, names)) };
  }
}

function toEntry(r: StoredAuditEntry, names: TargetNames): AuditLogEntry {
  return {
    id: r.id,
    at: r.at.toISOString(),
    user:
      r.userId === null ? null : { id: r.userId, name: r.userName ?? `Person ${r.userId} (no longer exists)`, email: r.userEmail ?? '' },
    action: r.action,
    target: r.target,
    targetLabel: labelOf(r.target, names),
    detail: r.detail,
  };
}
