/**
 * Wind stow. A stow for gusts is an event, not a fault: it is reported (stowed, released) for the record and for
 * availability accounting. What is a fault — critical — is a unit that has not reached stow within the allowed time while
 * the site's gusts are above the stow limit. The site's demand for stow starts with the first gust reading above the
 * limit and ends once gusts have stayed below it for `stowReleaseMin`. Units on maintenance hold are exempt (the crew
 * holds them; the alarm evidence of the site says so).
 */
import { modePhrase } from '../../shared/contracts/plain-words';
import type { Telemetry, Weather } from '../../shared/contracts/wire';
import type { HealthSettings } from './health-settings';
import { judged, readingsSnapshot, round1, type Assessment, type UnitRef } from './unit-sample';

interface SiteState {
  demandSinceMs: number | null;
  lastHighMs: number;
  peakGustMs: number;
}

export class StowWatch {
  private readonly sites = new Map<number, SiteState>();

  weather(siteId: number, w: Weather, atMs: number, s: HealthSettings): void {
    let st = this.sites.get(siteId);
    if (!st) this.sites.set(siteId, (st = { demandSinceMs: null, lastHighMs: -Infinity, peakGustMs: 0 }));
    if (w.gustMs > s.stowGustMs) {
      st.demandSinceMs ??= atMs;
      st.lastHighMs = atMs;
      st.peakGustMs = Math.max(st.peakGustMs, w.gustMs);
    } else if (st.demandSinceMs !== null && atMs - st.lastHighMs >= s.stowReleaseMin * 60_000) {
      st.demandSinceMs = null;
      st.peakGustMs = 0;
    }
  }

  /** Whether the site is in a wind stow now. */
  demanding(siteId: number): boolean {
    return (this.sites.get(siteId)?.demandSinceMs ?? null) !== null;
  }

  assess(unit: UnitRef, t: Telemetry, atMs: number, s: HealthSettings): Assessment {
    const st = this.sites.get(unit.siteId);
    if (!st || st.demandSinceMs === null || atMs < st.demandSinceMs) return judged(false);
    if (unit.onHold || t.mode === 'held') return judged(false);
    const stowed = t.mode === 'stowed' || t.tiltDeg <= s.stowTiltDeg;
    if (stowed) return judged(false);
    const since = st.demandSinceMs;
    return judged(true, () => ({
      severity: 'P1',
      message: `Not stowed ${round1((atMs - since) / 60_000)} min after gusts of ${round1(st.peakGustMs)} m/s (limit ${s.stowGustMs} m/s): tilt ${round1(t.tiltDeg)}°, ${modePhrase(t.mode)}.`,
      advice:
        'Keep everyone clear of the unit. Check its drive and power; send a stow if the unit answers, else make it safe on site once the wind allows.',
      evidence: {
        readings: readingsSnapshot(t),
        gustLimitMs: s.stowGustMs,
        peakGustMs: st.peakGustMs,
        demandSinceMs: since,
        allowedMin: s.stowArrivalMin,
      },
    }));
  }
}
