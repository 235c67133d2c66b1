import { TRACE_QUANTITIES, TRACE_QUANTITY_INFO, type TraceQuantity } from '../../shared/contracts/traces';

/**
 * Where each trace quantity is stored, derived from the one table in `shared/contracts/traces.ts`: a quantity's column
 * in `telemetry`, and its stem in `telemetry_1m` (`<stem>_min`, `<stem>_max`), is its name in snake case
 * (`tiltPlusWm2` → `tilt_plus_wm2`). A new quantity needs those columns (a migration) before it can be listed.
 */
export const traceColumn = (q: TraceQuantity): string => q.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

/** SQL expression of a quantity over a `telemetry` row: its column, or plus − minus for a photodifferential. */
export function traceSql(q: TraceQuantity): string {
  const d = TRACE_QUANTITY_INFO[q].difference;
  return d ? `${traceColumn(d[0])} - ${traceColumn(d[1])}` : traceColumn(q);
}

/** Every quantity whose per-minute extremes the rollup keeps: its `telemetry_1m` stem and its expression over a raw row. */
export const TRACE_EXTREMES: readonly (readonly [string, string])[] = TRACE_QUANTITIES.map((q) => [traceColumn(q), traceSql(q)] as const);
