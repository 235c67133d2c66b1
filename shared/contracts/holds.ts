/**
 * Maintenance holds. A hold is in force from the moment it is placed (whether or not the unit has heard of it yet) until
 * it is released; a unit may carry several, and motion is refused while any is in force.
 */

/** Who a hold belongs to: a person (placed from the unit view) or a ticket (a crew's check-in on a work order). */
export const HOLDER_KINDS = ['person', 'ticket'] as const;
export type HolderKind = (typeof HOLDER_KINDS)[number];

export interface HoldView {
  id: number;
  unitId: number;
  /** For a person the user; for a ticket the ticket, named "Ticket <id>". */
  holder: { kind: HolderKind; id: number; name: string };
  note: string | null;
  placedAt: string;
  placedBy: { id: number; name: string };
  releasedAt: string | null;
  releasedBy: { id: number; name: string } | null;
  /** Required when an admin releases a hold that is not their own. */
  releaseReason: string | null;
}

/** `GET /api/units/:id/holds`: the holds in force (oldest first) and the latest released ones (newest first). */
export interface UnitHolds {
  unitId: number;
  held: boolean;
  active: HoldView[];
  released: HoldView[];
}

/** Longest note on a hold and longest release reason [characters]. */
export const HOLD_TEXT_MAX = 500;
