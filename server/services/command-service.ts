import { randomUUID } from 'node:crypto';
import type { Logger } from 'pino';
import type { CommandView, IssueCommandRequest } from '../../shared/contracts/live';
import type { HolderKind, HoldView, UnitHolds } from '../../shared/contracts/holds';
import type { Command, CommandAck, UnitConfig } from '../../shared/contracts/wire';
import { HOLD_COMMANDS as HOLD_KINDS, MOTION_COMMANDS, WIRE_VERSION, type CommandKind } from '../../shared/contracts/wire-format';
import { may } from '../../shared/contracts/permissions';
import { commandWords } from '../../shared/contracts/plain-words';
import { AppError, badRequest, forbidden, notFound } from '../errors/app-error';
import type { CommandStore, CommandTx, StoredCommand } from '../data/command-repository';
import type { Caller } from './caller';
import type { LiveHub } from './live-hub';
import type { UnitDirectory, UnitInfo } from './unit-directory';

export interface CommandOptions {
  /** A sent command with no answer after this long is timed out [ms]. */
  ackTimeoutMs: number;
  /** A command queued for an offline unit expires after this long [ms] (holds and releases do not expire). */
  queueTimeoutMs: number;
  now: () => number;
  /**
   * A unit carried out a `configure` (answered `done`): the settings it now runs with, and who sent them. The unit
   * record follows (its detector tilt is what the trap detector and the scans judge it by).
   */
  onConfigured?: (unitId: number, config: UnitConfig, byUserId: number, commandId: string) => Promise<void>;
}

export const DEFAULT_COMMAND_OPTIONS: CommandOptions = { ackTimeoutMs: 30_000, queueTimeoutMs: 10 * 60_000, now: Date.now };

/** Publishes a command to a unit's `commands` topic (QoS 1). */
export type CommandPublisher = (serial: string, command: Command) => Promise<void>;

/**
 * Hold and release-hold carry the state the unit must end up in: they wait in the queue for as long as the unit is
 * offline instead of expiring (the hold is in force on the server meanwhile).
 */
const expires = (kind: CommandKind) => !HOLD_KINDS.includes(kind);

/**
 * Commands to units: checks who may send what, keeps the unit's maintenance holds, refuses motion while any hold is in
 * force, tracks each command queued → sent → acknowledged → completed (or rejected / timed-out / cancelled), sends queued
 * commands in the order issued, and writes every step, refusals included, to the audit trail.
 *
 * Holds: a hold is in force the moment it is stored, whether or not the unit has heard of it. Placing it cancels motion
 * still queued for the unit. The first hold sends `hold` to the unit; further holders add to it; only releasing the last
 * hold sends `release-hold`. A person's hold is released by that person, anyone's by an admin giving a reason.
 */
export class CommandService {
  private timer: NodeJS.Timeout | undefined;
  private readonly opts: CommandOptions;
  /** Per unit, the request in progress: one change at a time, and queued commands published in issue order. */
  private readonly unitChains = new Map<number, Promise<unknown>>();
  private readonly ackChains = new Map<string, Promise<void>>();

  constructor(
    private readonly store: CommandStore,
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

  /** Sends (or queues) a command; a refusal is written to the audit trail before it is thrown. */
  async issue(by: Caller, unitId: number, req: IssueCommandRequest): Promise<CommandView> {
    try {
      const unit = this.visibleUnit(by, unitId);
      this.checkRequest(by, unit, req);
      return await this.inOrder(unit.id, () => {
        const u = this.units.byUnitId(unit.id) ?? unit; // current serial after waiting for earlier requests
        return req.kind === 'hold'
          ? this.placeHold(by, u, req.note)
          : req.kind === 'release-hold'
            ? this.releaseHold(by, u, req.holdId, req.reason)
            : this.issueCommand(by, u, req);
      });
    } catch (err) {
      if (err instanceof AppError) await this.recordRefusal(by, unitId, req.kind, err);
      throw err;
    }
  }

  /**
   * Writes a refused command to the audit trail: who, which unit, the kind asked for, and the answer given. Also used by
   * the HTTP layer for requests refused before they reach `issue` (role, malformed body). Never throws.
   */
  async recordRefusal(by: Caller, unitId: number | null, kind: unknown, err: AppError): Promise<void> {
    try {
      await this.store.audit.append({
        userId: by.id,
        action: 'command-refused',
        ...(unitId !== null ? { target: `unit:${unitId}` } : {}),
        detail: {
          kind: typeof kind === 'string' ? kind.slice(0, 32) : null,
          status: err.status,
          code: err.code,
          message: err.message,
          ...(err.fields ? { fields: err.fields } : {}),
        },
      });
    } catch (auditErr) {
      this.log.error({ err: auditErr, unitId, code: err.code }, 'refused command not audited');
    }
  }

  async list(by: Caller, unitId: number): Promise<CommandView[]> {
    const unit = this.visibleUnit(by, unitId);
    return (await this.store.commands.listForUnit(unit.id)).map((v) => this.withExpiry(v));
  }

  /** The unit's holds in force and the latest released ones; 404 for a unit the caller may not see. */
  async holds(by: Caller, unitId: number): Promise<UnitHolds> {
    const unit = this.visibleUnit(by, unitId);
    const [active, released] = await Promise.all([this.store.holds.active(unit.id), this.store.holds.released(unit.id)]);
    return { unitId: unit.id, held: active.length > 0, active, released };
  }

  /**
   * A ticket's check-in: the ticket holds the unit, in force at once and cancelling queued motion, like a person's hold.
   * Nothing happens when the ticket already holds it (a retried check-in).
   */
  async holdForTicket(by: Caller, unitId: number, ticketId: number, note: string): Promise<void> {
    const unit = this.visibleUnit(by, unitId);
    await this.inOrder(unit.id, async () => {
      const u = this.units.byUnitId(unit.id) ?? unit;
      if (u.holds.some((h) => h.holder.kind === 'ticket' && h.holder.id === ticketId)) return;
      await this.placeHold(by, u, note, { kind: 'ticket', id: ticketId });
    });
  }

  /** A ticket's check-out, cancel or close: its hold on the unit is released (nothing when it holds none). */
  async releaseForTicket(by: Caller, unitId: number, ticketId: number, reason: string): Promise<void> {
    const unit = this.visibleUnit(by, unitId);
    await this.inOrder(unit.id, async () => {
      const u = this.units.byUnitId(unit.id) ?? unit;
      const hold = u.holds.find((h) => h.holder.kind === 'ticket' && h.holder.id === ticketId);
      if (hold) await this.releaseHold(by, u, hold.id, reason, ticketId);
    });
  }

  /** The unit answered a command. Answers to one command are applied in arrival order. */
  onAck(unit: UnitInfo, ack: CommandAck): Promise<void> {
    const prev = this.ackChains.get(ack.commandId) ?? Promise.resolve();
    const next = prev.then(() => this.applyAck(unit, ack));
    this.ackChains.set(ack.commandId, next);
    void next
      .finally(() => {
        if (this.ackChains.get(ack.commandId) === next) this.ackChains.delete(ack.commandId);
      })
      .catch(() => undefined);
    return next;
  }

  /** A unit came online: make sure it holds (or not) as its holds say, then send what was queued, in the order issued. */
  onOnline(reported: UnitInfo): Promise<void> {
    return this.inOrder(reported.id, async () => {
      const unit = this.units.byUnitId(reported.id) ?? reported; // the directory's current entry: holds as of now
      await this.resyncHold(unit);
      for (const cmd of await this.store.commands.queuedForUnit(unit.id)) {
        if (MOTION_COMMANDS.includes(cmd.kind) && this.isHeld(unit)) {
          await this.finish(cmd, 'cancelled', 'unit is on maintenance hold');
          continue;
        }
        // A failed publish leaves this one queued and stops here, so later commands never overtake it.
        await this.send(unit, cmd);
        await this.emit(cmd.id);
      }
    });
  }

  /** Times out what waited too long: queued motion and settings after `queueTimeoutMs`, sent commands after `ackTimeoutMs`. */
  async sweep(): Promise<void> {
    const now = this.opts.now();
    for (const cmd of await this.store.commands.open()) {
      if (cmd.status === 'queued' && expires(cmd.kind) && now - cmd.issuedAt.getTime() > this.opts.queueTimeoutMs)
        await this.finish(cmd, 'timed-out', 'unit stayed offline');
      else if (cmd.status === 'sent' && cmd.sentAt && now - cmd.sentAt.getTime() > this.opts.ackTimeoutMs)
        await this.finish(cmd, 'timed-out', 'no answer from the unit');
    }
  }

  // ---- checks

  private visibleUnit(by: Caller, unitId: number): UnitInfo {
    const unit = this.units.byUnitId(unitId);
    if (!unit || (by.role === 'owner' && unit.ownerId !== by.ownerId)) throw notFound('Unit');
    return unit;
  }

  private checkRequest(by: Caller, unit: UnitInfo, req: IssueCommandRequest): void {
    if (!may(by.role, 'command')) throw forbidden('Owners cannot command units.');
    if (by.role === 'crew' && !HOLD_KINDS.includes(req.kind))
      throw forbidden('Field crews may only put a unit on maintenance hold or release it.');
    const misplaced: Record<string, string> = {};
    if (req.note !== undefined && req.kind !== 'hold') misplaced['note'] = 'Only for hold.';
    if (req.holdId !== undefined && req.kind !== 'release-hold') misplaced['holdId'] = 'Only for release-hold.';
    if (req.reason !== undefined && req.kind !== 'release-hold') misplaced['reason'] = 'Only for release-hold.';
    if (Object.keys(misplaced).length)
      throw badRequest(
        `Field(s) ${Object.keys(misplaced).join(', ')} do not belong to the command “${commandWords(req.kind)}”.`,
        misplaced,
      );
    if (req.kind === 'goto' && (req.tiltDeg === undefined || req.azimuthDeg === undefined)) {
      throw badRequest('Go to needs a tilt and an azimuth.', {
        ...(req.tiltDeg === undefined ? { tiltDeg: 'Required for go to.' } : {}),
        ...(req.azimuthDeg === undefined ? { azimuthDeg: 'Required for go to.' } : {}),
      });
    }
    if (req.kind === 'configure' && (!req.config || !Object.keys(req.config).length))
      throw badRequest('Configure needs at least one setting.', { config: 'Required for configure.' });
    if (req.confirm !== true) {
      if (MOTION_COMMANDS.includes(req.kind))
        throw badRequest('Motion commands must be confirmed: make sure nobody is within reach of the unit.', {
          confirm: 'Must be true for a command that moves the unit.',
        });
      if (req.kind === 'release-hold')
        throw badRequest(`Releasing a hold on ${unit.serial} must be confirmed: the unit may move at once.`, {
          confirm: 'Must be true to release a hold: the unit may move at once.',
        });
      if (req.kind === 'configure')
        throw badRequest(`New settings for ${unit.serial} must be confirmed: they change how the unit moves.`, {
          confirm: 'Must be true for configure: new settings change how the unit moves.',
        });
    }
  }

  /** Held: a hold is in force, or the unit itself reports it is held (a hold set on the unit, or a release not yet carried out). */
  private isHeld(unit: UnitInfo): boolean {
    return unit.holds.length > 0 || this.live.get(unit.id)?.mode === 'held';
  }

  private onHoldError(unit: UnitInfo, holds: HoldView[]): AppError {
    const who = holds.length
      ? `on maintenance hold by ${holds.map((h) => h.holder.name).join(', ')}: motion commands are refused until every hold is released.`
      : 'reporting that it is held on the unit itself: motion commands are refused until it reports otherwise.';
    return new AppError(409, 'unit_on_hold', `${unit.serial} is ${who}`);
  }

  // ---- requests

  private async issueCommand(by: Caller, unit: UnitInfo, req: IssueCommandRequest): Promise<CommandView> {
    const motion = MOTION_COMMANDS.includes(req.kind);
    const now = new Date(this.opts.now());
    const params =
      req.kind === 'goto' ? { tiltDeg: req.tiltDeg, azimuthDeg: req.azimuthDeg } : req.kind === 'configure' ? { config: req.config } : null;
    const row = this.newRow(by.id, unit, req.kind, now, params);
    await this.store.locked(unit.id, async (tx) => {
      if (motion) {
        const holds = await tx.holds.active(unit.id);
        if (holds.length || this.live.get(unit.id)?.mode === 'held') throw this.onHoldError(unit, holds);
      }
      await tx.commands.insert(row);
      await this.auditCommand(tx, by, unit, row, params ?? {});
    });
    return this.dispatch(unit, row);
  }

  private async placeHold(
    by: Caller,
    unit: UnitInfo,
    note: string | undefined,
    holder: { kind: HolderKind; id: number } = { kind: 'person', id: by.id },
  ): Promise<CommandView> {
    const now = new Date(this.opts.now());
    const { row, holds, cancelled } = await this.store.locked(unit.id, async (tx) => {
      const before = await tx.holds.active(unit.id);
      if (before.some((h) => h.holder.kind === holder.kind && h.holder.id === holder.id)) {
        throw new AppError(
          409,
          'already_holding',
          holder.kind === 'person'
            ? `You already hold ${unit.serial}: your hold stays in force until you release it.`
            : `Ticket ${holder.id} already holds ${unit.serial}.`,
        );
      }
      const first = before.length === 0;
      const row = this.newRow(
        by.id,
        unit,
        'hold',
        now,
        null,
        first ? null : { status: 'completed', reason: 'Added to the hold already in force: nothing more to send to the unit.' },
      );
      await tx.commands.insert(row);
      const holdId = await tx.holds.insert({
        unitId: unit.id,
        holderKind: holder.kind,
        holderId: holder.id,
        note: note?.trim() || null,
        placedAt: now,
        placedBy: by.id,
        commandId: row.id,
      });
      const holds = await tx.holds.active(unit.id);
      const name = holds.find((h) => h.id === holdId)!.holder.name;
      const cancelled = await tx.commands.cancelQueued(
        unit.id,
        MOTION_COMMANDS,
        `Cancelled before it reached the unit: maintenance hold placed by ${name}.`,
        now,
      );
      await this.auditCommand(tx, by, unit, row, { holdId });
      await tx.audit.append({
        userId: by.id,
        action: 'hold-place',
        target: `unit:${unit.id}`,
        detail: { holdId, holder, commandId: row.id, note: note?.trim() || null, firstHold: first, cancelledCommands: cancelled },
      });
      return { row, holds, cancelled };
    });
    this.holdsChanged(unit, holds);
    for (const id of cancelled) await this.emit(id);
    return this.dispatch(unit, row);
  }

  /** `forTicket`: the release is the check-out, cancel or close of that ticket, which holds the hold. */
  private async releaseHold(
    by: Caller,
    unit: UnitInfo,
    holdId: number | undefined,
    reason: string | undefined,
    forTicket?: number,
  ): Promise<CommandView> {
    const now = new Date(this.opts.now());
    const why = reason?.trim() || null;
    const { row, holds } = await this.store.locked(unit.id, async (tx) => {
      const active = await tx.holds.active(unit.id);
      const hold =
        holdId === undefined
          ? active.find((h) => h.holder.kind === 'person' && h.holder.id === by.id)
          : active.find((h) => h.id === holdId);
      if (!hold && holdId === undefined) {
        if (!active.length) throw new AppError(409, 'not_held', `${unit.serial} is not on hold.`);
        throw new AppError(
          409,
          'no_own_hold',
          `You have no hold on ${unit.serial} to release. ` +
            (by.role === 'admin'
              ? "To release someone else's, name the hold (holdId) and give a reason."
              : `It is held by ${active.map((h) => h.holder.name).join(', ')}; a hold is released by its holder, or by an admin giving a reason.`),
        );
      }
      if (!hold) {
        const old = await tx.holds.get(holdId!);
        if (old && old.unitId === unit.id) throw new AppError(409, 'hold_released', `That hold was already released (${old.releasedAt}).`);
        throw notFound('Hold');
      }
      const own =
        (hold.holder.kind === 'person' && hold.holder.id === by.id) || (hold.holder.kind === 'ticket' && hold.holder.id === forTicket);
      if (!own && by.role !== 'admin') {
        throw forbidden(
          hold.holder.kind === 'ticket'
            ? "A ticket's hold is released by the ticket's check-out, cancel or close, or by an admin giving a reason."
            : `Only ${hold.holder.name}, who placed this hold, or an admin giving a reason may release it.`,
        );
      }
      if (!own && !why)
        throw badRequest('Say why you release a hold that is not yours.', { reason: "Required when releasing someone else's hold." });
      if (!(await tx.holds.release(hold.id, { releasedAt: now, releasedBy: by.id, releaseReason: why })))
        throw new AppError(409, 'hold_released', 'That hold was already released.');
      const holds = active.filter((h) => h.id !== hold.id);
      const row = this.newRow(
        by.id,
        unit,
        'release-hold',
        now,
        null,
        holds.length
          ? {
              status: 'completed',
              reason: `Hold released; ${holds.length === 1 ? 'another hold keeps' : `${holds.length} other holds keep`} the unit held, so nothing was sent.`,
            }
          : null,
      );
      await tx.commands.insert(row);
      await this.auditCommand(tx, by, unit, row, { holdId: hold.id });
      await tx.audit.append({
        userId: by.id,
        action: 'hold-release',
        target: `unit:${unit.id}`,
        detail: { holdId: hold.id, holder: hold.holder, ownHold: own, reason: why, commandId: row.id, holdsLeft: holds.length },
      });
      return { row, holds };
    });
    this.holdsChanged(unit, holds);
    return this.dispatch(unit, row);
  }

  /**
   * On reconnect: a unit with holds in force whose latest hold did not get through (timed out, refused, or sent to the
   * connection just replaced and unanswered), or whose last delivery was a release, is sent `hold` again, and a unit with none whose last release timed out is sent
   * `release-hold` again, attributed to the person whose hold or release it carries out.
   */
  private async resyncHold(unit: UnitInfo): Promise<void> {
    const [last, holds] = await Promise.all([this.store.commands.lastHoldDelivery(unit.id), this.store.holds.active(unit.id)]);
    // 'sent' and unanswered: it went to the connection that has just been replaced and may never have arrived.
    const lost = last && (last.status === 'timed-out' || last.status === 'rejected' || last.status === 'sent');
    const held = holds.length > 0;
    if (held && (!last || last.kind === 'release-hold' || lost)) {
      const by = holds[0]!.placedBy.id;
      await this.resend(unit, 'hold', by, last);
    } else if (!held && last?.kind === 'release-hold' && last.status === 'timed-out') {
      await this.resend(unit, 'release-hold', last.issuedBy, last);
    }
  }

  private async resend(unit: UnitInfo, kind: 'hold' | 'release-hold', by: number, after: StoredCommand | undefined): Promise<void> {
    const row = this.newRow(by, unit, kind, new Date(this.opts.now()), null);
    await this.store.locked(unit.id, async (tx) => {
      await tx.commands.insert(row);
      await tx.audit.append({
        userId: by,
        action: 'command',
        target: `unit:${unit.id}`,
        detail: { commandId: row.id, kind, resentAfter: after?.id ?? null, why: 'unit came online without the hold state of its holds' },
      });
    });
    await this.emit(row.id);
  }

  // ---- unit answers and delivery

  private async applyAck(unit: UnitInfo, ack: CommandAck): Promise<void> {
    const cmd = await this.store.commands.row(ack.commandId);
    if (!cmd || cmd.unitId !== unit.id || !['queued', 'sent', 'acknowledged'].includes(cmd.status)) return; // late answer to a finished command, or not ours
    if (ack.result === 'accepted' && cmd.status === 'acknowledged') return;
    const at = new Date(this.opts.now());
    if (ack.result === 'rejected') {
      await this.store.commands.update(cmd.id, {
        status: 'rejected',
        reason: ack.reason ?? 'rejected by the unit',
        ackedAt: cmd.ackedAt ?? at,
        finishedAt: at,
      });
    } else if (ack.result === 'accepted') {
      await this.store.commands.update(cmd.id, { status: 'acknowledged', ackedAt: at });
    } else {
      await this.store.commands.update(cmd.id, { status: 'completed', ackedAt: cmd.ackedAt ?? at, finishedAt: at });
      const config = cmd.kind === 'configure' ? (cmd.params as { config?: UnitConfig } | null)?.config : undefined;
      if (config && this.opts.onConfigured)
        await this.opts
          .onConfigured(unit.id, config, cmd.issuedBy, cmd.id)
          .catch((err) => this.log.error({ err, unitId: unit.id, commandId: cmd.id }, 'configured settings not recorded on the unit'));
    }
    await this.emit(cmd.id);
  }

  private newRow(
    byUserId: number,
    unit: UnitInfo,
    kind: CommandKind,
    at: Date,
    params: object | null,
    done?: { status: 'completed'; reason: string } | null,
  ): StoredCommand {
    return {
      id: randomUUID(),
      unitId: unit.id,
      kind,
      params: params ? { ...params } : null,
      status: done?.status ?? 'queued',
      reason: done?.reason ?? null,
      issuedBy: byUserId,
      issuedAt: at,
      sentAt: null,
      ackedAt: null,
      finishedAt: done ? at : null,
    };
  }

  private auditCommand(tx: CommandTx, by: Caller, unit: UnitInfo, row: StoredCommand, detail: object): Promise<void> {
    return tx.audit.append({
      userId: by.id,
      action: 'command',
      target: `unit:${unit.id}`,
      detail: { commandId: row.id, kind: row.kind, ...detail },
    });
  }

  /** After a stored request: send it now if it is queued and the unit is online, and tell the dashboards. */
  private async dispatch(unit: UnitInfo, row: StoredCommand): Promise<CommandView> {
    if (row.status === 'queued' && this.live.get(unit.id)?.online) {
      // Stored and in force already: a failed publish leaves it queued for the unit's next connection.
      await this.send(unit, row).catch((err) => this.log.warn({ err, commandId: row.id }, 'command publish failed; left queued'));
    }
    return this.emit(row.id);
  }

  private holdsChanged(unit: UnitInfo, holds: HoldView[]): void {
    this.units.setHolds(unit.id, holds);
    this.live.onHoldChanged(this.units.byUnitId(unit.id) ?? { ...unit, holds, onHold: holds.length > 0 });
  }

  private async send(unit: UnitInfo, cmd: StoredCommand): Promise<void> {
    const params = cmd.params ?? {};
    const at = new Date(this.opts.now());
    // Mark it sent first: the unit's answer can arrive before the publish call returns.
    await this.store.commands.update(cmd.id, { status: 'sent', sentAt: at });
    cmd.status = 'sent';
    cmd.sentAt = at;
    try {
      await this.publish(unit.serial, { v: WIRE_VERSION, commandId: cmd.id, ts: at.toISOString(), kind: cmd.kind, ...params });
    } catch (err) {
      await this.store.commands.update(cmd.id, { status: 'queued', sentAt: null });
      cmd.status = 'queued';
      cmd.sentAt = null;
      throw err;
    }
  }

  private async finish(cmd: StoredCommand, status: 'rejected' | 'timed-out' | 'cancelled', reason: string): Promise<void> {
    await this.store.commands.update(cmd.id, { status, reason, finishedAt: new Date(this.opts.now()) });
    await this.emit(cmd.id);
  }

  private withExpiry(v: CommandView): CommandView {
    return {
      ...v,
      expiresAt:
        v.status === 'queued' && expires(v.kind) ? new Date(Date.parse(v.issuedAt) + this.opts.queueTimeoutMs).toISOString() : null,
    };
  }

  private async emit(id: string): Promise<CommandView> {
    const view = this.withExpiry((await this.store.commands.get(id))!);
    this.live.publishCommand(view);
    return view;
  }

  /** Runs `fn` after every earlier request for the same unit has finished. */
  private inOrder<T>(unitId: number, fn: () => Promise<T>): Promise<T> {
    const next = (this.unitChains.get(unitId) ?? Promise.resolve()).catch(() => undefined).then(fn);
    this.unitChains.set(unitId, next);
    void next
      .catch(() => undefined)
      .finally(() => {
        if (this.unitChains.get(unitId) === next) this.unitChains.delete(unitId);
      });
    return next;
  }
}
