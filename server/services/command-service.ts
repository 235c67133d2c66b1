import { randomUUID } from 'node:crypto';
import type { Logger } from 'pino';
import type { CommandView, IssueCommandRequest } from '../../shared/contracts/live';
import { MOTION_COMMANDS, type Command, type CommandAck } from '../../shared/contracts/wire';
import { AppError, badRequest, forbidden, notFound } from '../errors/app-error';
import type { CommandRepository, CommandRow } from '../data/command-repository';
import type { AuditRepository } from '../data/audit-repository';
import type { UnitRepository } from '../data/unit-repository';
import type { Caller } from './caller';
import type { LiveHub } from './live-hub';
import type { UnitDirectory, UnitInfo } from './unit-directory';

export interface CommandOptions {
  /** A sent command with no answer after this long is timed out [ms]. */
  ackTimeoutMs: number;
  /** A command queued for an offline unit expires after this long [ms]. */
  queueTimeoutMs: number;
  now: () => number;
}

export const DEFAULT_COMMAND_OPTIONS: CommandOptions = { ackTimeoutMs: 30_000, queueTimeoutMs: 10 * 60_000, now: Date.now };

/** Publishes a command to a unit's `commands` topic (QoS 1). */
export type CommandPublisher = (serial: string, command: Command) => Promise<void>;

/**
 * Commands to units: checks who may send what, refuses motion to a unit on maintenance hold, tracks each command
 * queued → sent → acknowledged → completed (or rejected / timed-out), and writes every step to the audit trail.
 */
export class CommandService {
  private timer: NodeJS.Timeout | undefined;
  private readonly opts: CommandOptions;

  constructor(
    private readonly repo: CommandRepository,
    private readonly audit: AuditRepository,
    private readonly unitRepo: UnitRepository,
    private readonly units: UnitDirectory,
    private readonly live: LiveHub,
    private readonly publish: CommandPublisher,
    private readonly log: Logger,
    opts: Partial<CommandOptions> = {},
  ) {
    this.opts = { ...DEFAULT_COMMAND_OPTIONS, ...opts };
  }

  start(): void {
    this.timer = setInterval(() => void this.sweep().catch((err) => this.log.error({ err }, 'command sweep failed')), 1000);
    this.timer.unref();
  }

  stop(): void {
    clearInterval(this.timer);
  }

  async issue(by: Caller, unitId: number, req: IssueCommandRequest): Promise<CommandView> {
    const unit = this.units.byUnitId(unitId);
    if (!unit || (by.role === 'owner' && unit.ownerId !== by.ownerId)) throw notFound('Unit');
    const motion = MOTION_COMMANDS.includes(req.kind);
    if (by.role === 'owner') throw forbidden('Owners cannot command units.');
    if (by.role === 'crew' && req.kind !== 'hold' && req.kind !== 'release-hold') throw forbidden('Field crews may only put a unit on maintenance hold or release it.');
    if (req.kind === 'goto' && (req.tiltDeg === undefined || req.azimuthDeg === undefined)) {
      throw badRequest('Go to needs a tilt and an azimuth.', { ...(req.tiltDeg === undefined ? { tiltDeg: 'Required for go to.' } : {}), ...(req.azimuthDeg === undefined ? { azimuthDeg: 'Required for go to.' } : {}) });
    }
    if (req.kind === 'configure' && (!req.config || !Object.keys(req.config).length)) throw badRequest('Configure needs at least one setting.', { config: 'Required for configure.' });
    if (motion && req.confirm !== true) throw badRequest('Motion commands must be confirmed: make sure nobody is within reach of the unit.', { confirm: 'Must be true for a command that moves the unit.' });
    if (motion && this.isHeld(unit)) {
      throw new AppError(409, 'unit_on_hold', `${unit.serial} is on maintenance hold: motion commands are refused until the crew releases the hold.`);
    }
    const now = new Date(this.opts.now());
    const params = req.kind === 'goto' ? { tiltDeg: req.tiltDeg, azimuthDeg: req.azimuthDeg } : req.kind === 'configure' ? { config: req.config } : null;
    const row: CommandRow = {
      id: randomUUID(), unit_id: unit.id, kind: req.kind, params: params ? JSON.stringify(params) : null, status: 'queued',
      reason: null, issued_by: by.id, issued_at: now, sent_at: null, acked_at: null, finished_at: null,
    };
    await this.repo.insert(row);
    await this.audit.append({ userId: by.id, action: 'command', target: `unit:${unit.id}`, detail: { commandId: row.id, kind: req.kind, ...params } });
    if (this.live.get(unit.id)?.online) await this.send(unit, row);
    return this.emit(row.id);
  }

  list(by: Caller, unitId: number): Promise<CommandView[]> {
    const unit = this.units.byUnitId(unitId);
    if (!unit || (by.role === 'owner' && unit.ownerId !== by.ownerId)) throw notFound('Unit');
    return this.repo.listForUnit(unitId);
  }

  private readonly ackChains = new Map<string, Promise<void>>();

  /** The unit answered a command. Answers to one command are applied in arrival order. */
  onAck(unit: UnitInfo, ack: CommandAck): Promise<void> {
    const prev = this.ackChains.get(ack.commandId) ?? Promise.resolve();
    const next = prev.then(() => this.applyAck(unit, ack));
    this.ackChains.set(ack.commandId, next);
    void next.finally(() => {
      if (this.ackChains.get(ack.commandId) === next) this.ackChains.delete(ack.commandId);
    }).catch(() => undefined);
    return next;
  }

  private async applyAck(unit: UnitInfo, ack: CommandAck): Promise<void> {
    const cmd = (await this.repo.open()).find((c) => c.id === ack.commandId && c.unit_id === unit.id);
    if (!cmd) return; // late answer to a finished command, or not ours
    if (ack.result === 'accepted' && cmd.status === 'acknowledged') return;
    const at = new Date(this.opts.now());
    if (ack.result === 'rejected') {
      await this.repo.update(cmd.id, { status: 'rejected', reason: ack.reason ?? 'rejected by the unit', acked_at: cmd.acked_at ?? at, finished_at: at });
    } else if (ack.result === 'accepted') {
      await this.repo.update(cmd.id, { status: 'acknowledged', acked_at: at });
      await this.applyHold(unit, cmd);
    } else {
      await this.repo.update(cmd.id, { status: 'completed', acked_at: cmd.acked_at ?? at, finished_at: at });
      await this.applyHold(unit, cmd);
    }
    await this.emit(cmd.id);
  }

  /** A unit came online: send what was queued for it. */
  async onOnline(unit: UnitInfo): Promise<void> {
    for (const cmd of (await this.repo.open()).filter((c) => c.unit_id === unit.id && c.status === 'queued')) {
      if (MOTION_COMMANDS.includes(cmd.kind) && this.isHeld(unit)) {
        await this.finish(cmd, 'rejected', 'unit is on maintenance hold');
        continue;
      }
      await this.send(unit, cmd);
      await this.emit(cmd.id);
    }
  }

  /** Times out what waited too long. */
  async sweep(): Promise<void> {
    const now = this.opts.now();
    for (const cmd of await this.repo.open()) {
      if (cmd.status === 'queued' && now - cmd.issued_at.getTime() > this.opts.queueTimeoutMs) await this.finish(cmd, 'timed-out', 'unit stayed offline');
      else if (cmd.status === 'sent' && cmd.sent_at && now - cmd.sent_at.getTime() > this.opts.ackTimeoutMs) await this.finish(cmd, 'timed-out', 'no answer from the unit');
    }
  }

  private isHeld(unit: UnitInfo): boolean {
    return unit.onHold || this.live.get(unit.id)?.mode === 'held';
  }

  private async send(unit: UnitInfo, cmd: CommandRow): Promise<void> {
    const params = cmd.params ? (typeof cmd.params === 'string' ? JSON.parse(cmd.params) : cmd.params) : {};
    const at = new Date(this.opts.now());
    // Mark it sent first: the unit's answer can arrive before the publish call returns.
    await this.repo.update(cmd.id, { status: 'sent', sent_at: at });
    cmd.status = 'sent';
    cmd.sent_at = at;
    try {
      await this.publish(unit.serial, { v: 1, commandId: cmd.id, ts: at.toISOString(), kind: cmd.kind, ...params });
    } catch (err) {
      await this.repo.update(cmd.id, { status: 'queued', sent_at: null });
      throw err;
    }
  }

  private async finish(cmd: CommandRow, status: 'rejected' | 'timed-out', reason: string): Promise<void> {
    await this.repo.update(cmd.id, { status, reason, finished_at: new Date(this.opts.now()) });
    await this.emit(cmd.id);
  }

  private async applyHold(unit: UnitInfo, cmd: CommandRow): Promise<void> {
    if (cmd.kind !== 'hold' && cmd.kind !== 'release-hold') return;
    const onHold = cmd.kind === 'hold';
    await this.unitRepo.update(unit.id, { on_hold: onHold });
    this.units.setHold(unit.id, onHold);
    this.live.onHoldChanged(unit);
  }

  private async emit(id: string): Promise<CommandView> {
    const view = (await this.repo.get(id))!;
    this.live.publishCommand(view);
    return view;
  }
}
