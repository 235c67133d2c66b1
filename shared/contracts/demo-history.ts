/**
 * Progress of the demo's generated past as `GET /api/demo-history` returns it (admins only). The first phase (13 months of
 * rollups, the last day at full rate, the past alarms) is done before the server starts; the other full-rate days fill
 * in the background, newest first.
 */
export interface DemoHistoryView {
  /** `none`: the past was never generated (not a demo database, or BW_DEMO_HISTORY_DAYS=0 and nothing else to fill). */
  state: 'none' | 'loading' | 'background' | 'done' | 'failed';
  /** Full-rate days planned and done. */
  daysTotal: number;
  daysDone: number;
  message: string;
  /** The "now" the fill was planned for, ISO 8601 UTC. */
  plannedAt: string | null;
  updatedAt: string | null;
}
