import { Router } from 'express';
import { z } from 'zod';
import { unitConfigSchema } from '../../shared/contracts/wire';
import { COMMAND_KINDS } from '../../shared/contracts/wire-format';
import { HOLD_TEXT_MAX } from '../../shared/contracts/holds';
import type { AdminService } from '../services/admin-service';
import type { CommandService } from '../services/command-service';
import { may } from '../../shared/contracts/permissions';
import type { IngestService } from '../services/ingest-service';
import type { LiveHub } from '../services/live-hub';
import type { TelemetryHistory } from '../services/telemetry-history';
import type { RollupWorker } from '../services/rollup-worker';
import type { BrokerCounters } from '../../broker/broker';
import { AppError, badRequest, forbidden } from '../errors/app-error';
import { callerOf, requireRole } from './access';
import { idParam, parse } from './validation';

const commandBody = z.strictObject({
  kind: z.enum(COMMAND_KINDS, `Must be one of ${COMMAND_KINDS.join(', ')}.`),
  tiltDeg: z.number().min(0, 'Must be between 0 and 90 °.').max(90, 'Must be between 0 and 90 °.').optional(),
  azimuthDeg: z.number().min(0, 'Must be between 0 and 360 °.').max(360, 'Must be between 0 and 360 °.').optional(),
  config: unitConfigSchema.optional(),
  confirm: z.boolean().optional(),
  note: z.string().max(HOLD_TEXT_MAX, `At most ${HOLD_TEXT_MAX} characters.`).optional(),
  holdId: z.number().int().positive('Must be a positive whole number.').optional(),
  reason: z.string().max(HOLD_TEXT_MAX, `At most ${HOLD_TEXT_MAX} characters.`).optional(),
});

const rangeQuery = z.strictObject({
  from: z.iso.datetime({ offset: true, error: 'Must be an ISO 8601 time with an offset.' }),
  to: z.iso.datetime({ offset: true, error: 'Must be an ISO 8601 time with an offset.' }),
});

export interface TelemetryRouteDeps {
  admin: AdminService;
  commands: CommandService;
  ingest: IngestService;
  live: LiveHub;
  telemetry: TelemetryHistory;
  rollups: RollupWorker;
  /** What the broker turned away (bad packets, refused CONNECTs, ACL refusals). */
  brokerCounters?: () => BrokerCounters;
}

/** Live state, raw telemetry, commands and ingest metrics. Mounted behind requireSession. */
export function telemetryRoutes(d: TelemetryRouteDeps): Router {
  const r = Router();
  const id = (params: unknown) => parse(idParam, params).id;

  r.get('/units/:id/state', async (req, res) => {
    const unit = await d.admin.getUnit(callerOf(req), id(req.params)); // 404 outside the caller's scope
    res.json(d.live.get(unit.id) ?? null);
  });

  r.get('/units/:id/telemetry', async (req, res) => {
    const unit = await d.admin.getUnit(callerOf(req), id(req.params));
    const q = parse(rangeQuery, req.query);
    const from = new Date(q.from);
    const to = new Date(q.to);
    if (!(from < to)) throw badRequest('The range is empty.', { to: 'Must be after from.' });
    res.json(await d.telemetry.recent(unit.id, from, to));
  });

  r.get('/units/:id/commands', async (req, res) => {
    res.json(await d.commands.list(callerOf(req), id(req.params)));
  });

  // Every refusal is audited: those of this layer (role, malformed request) here, the rest by the command service.
  r.post('/units/:id/commands', async (req, res) => {
    const caller = callerOf(req);
    let unitId: number;
    let body: z.infer<typeof commandBody>;
    try {
      if (!may(caller.role, 'command')) throw forbidden();
      unitId = id(req.params);
      body = parse(commandBody, req.body);
    } catch (err) {
      if (err instanceof AppError) {
        const raw = Number((req.params as { id?: string }).id);
        await d.commands.recordRefusal(
          caller,
          Number.isInteger(raw) && raw > 0 ? raw : null,
          (req.body as { kind?: unknown } | undefined)?.kind,
          err,
        );
      }
      throw err;
    }
    res.status(201).json(await d.commands.issue(caller, unitId, body));
  });

  r.get('/units/:id/holds', async (req, res) => {
    res.json(await d.commands.holds(callerOf(req), id(req.params)));
  });

  r.get('/metrics', requireRole('readMetrics'), (_req, res) => {
    res.json({
      ingest: { ...d.ingest.counters, buffered: d.ingest.bufferedRows },
      broker: d.brokerCounters?.() ?? null,
      rollups: { passes: d.rollups.passes },
    });
  });
  return r;
}
