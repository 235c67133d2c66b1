import type { AlarmView } from '../../shared/contracts/alarms';
import type { AlarmFilter, AlarmRepository } from '../data/alarm-repository';
import { notFound } from '../errors/app-error';
import type { AdminService } from './admin-service';
import { scopeOf, type Caller } from './caller';
import type { LiveHub } from './live-hub';

/** Stored alarms as the REST routes read them: listed within the caller's scope, acknowledged with an audit entry. */
export class AlarmService {
  constructor(
    private readonly repo: AlarmRepository,
    private readonly admin: AdminService,
    private readonly live: LiveHub,
    private readonly now: () => number,
  ) {}

  async list(c: Caller, f: AlarmFilter): Promise<AlarmView[]> {
    if (f.siteId !== undefined) await this.admin.getSite(c, f.siteId);
    if (f.unitId !== undefined) await this.admin.getUnit(c, f.unitId);
    return this.repo.list(scopeOf(c), f);
  }

  async get(c: Caller, id: number): Promise<AlarmView> {
    const v = await this.repo.get(id, scopeOf(c));
    if (!v) throw notFound('Alarm');
    return v;
  }

  async acknowledge(c: Caller, id: number): Promise<AlarmView> {
    const a = await this.get(c, id);
    await this.repo.acknowledge(id, c.id, new Date(this.now()), {
      action: 'alarm-acknowledge',
      target: `alarm:${id}`,
      detail: { unitId: a.unitId, serial: a.serial, siteId: a.siteId, kind: a.kind, severity: a.severity },
    });
    const v = await this.get(c, id);
    if (v.unitId !== null) this.live.publishAlarm(v.unitId, v);
    return v;
  }
}
