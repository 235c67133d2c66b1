/**
 * Local-maximum trap: the unit is settled (its photodifferentials inside the deadband, so it reports itself healthy) while
 * its in-plane irradiance is well below (a) the modelled global maximum of its site at that instant and (b) what its site
 * peers get. When every peer is as low (a site-wide trap, e.g. all units on a facade reflection) the peer comparison cannot
 * help; the model is then trusted only where it is confirmed at the unit's own orientation (measured and modelled in-plane
 * irradiance agree), and so it is when fewer than two peers can be compared. Not while stowed, held, scanning or in
 * fault; not at night; not when another open cause (stall, drift, hunting) explains the deficit.
 */
import type { Telemetry } from '../../shared/contracts/wire';
import type { HealthSettings } from './health-settings';
import type { SiteModel } from './site-model';
import { judged, MOTION_FREE_MODES, readingsSnapshot, round1, type Assessment, type UnitRef } from './unit-sample';

export interface PeerReading {
  unitId: number;
  poaWm2: number;
  mode: string;
  atMs: number;
}

/**
 * The in-plane irradiance of a site's comparable peers (settled or seeking, heard within two minutes), sorted once per
 * site snapshot so that each report asks for its peers' quantile in O(log n), leaving itself out, instead of sorting
 * the whole site again (a site of 10,000 units made every report cost milliseconds).
 */
export class PeerLevels {
  static readonly none = new PeerLevels([], new Map());
  private constructor(
    private readonly sortedWm2: readonly number[],
    private readonly ownWm2: ReadonlyMap<number, number>,
  ) {}

  static of(peers: Iterable<PeerReading>, atMs: number): PeerLevels {
    const own = new Map<number, number>();
    for (const p of peers)
      if (Math.abs(atMs - p.atMs) <= PEER_MAX_AGE_MS && (p.mode === 'settled' || p.mode === 'seeking')) own.set(p.unitId, p.poaWm2);
    return new PeerLevels(
      [...own.values()].sort((a, b) => a - b),
      own,
    );
  }

  /** Peers other than `unitId`, and their linear-interpolated quantile q (null with fewer than two). */
  without(unitId: number, q: number): { count: number; quantileWm2: number | null } {
    const own = this.ownWm2.get(unitId);
    const s = this.sortedWm2;
    // Leave out one copy of the unit's own value: index skip at its first position.
    const skip = own === undefined ? s.length : lowerBound(s, own);
    const n = own === undefined ? s.length : s.length - 1;
    if (n < 2) return { count: n, quantileWm2: null };
    const at = (i: number) => s[i < skip ? i : i + 1]!;
    const pos = (n - 1) * q;
    const lo = Math.floor(pos);
    const hi = Math.ceil(pos);
    return { count: n, quantileWm2: at(lo) + (at(hi) - at(lo)) * (pos - lo) };
  }
}

function lowerBound(s: readonly number[], x: number): number {
  let lo = 0;
  let hi = s.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (s[mid]! < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

export interface TrapContext {
  model: SiteModel | undefined;
  daylight: boolean;
  peerLevels: PeerLevels;
  /** Another condition holding on the unit that explains a deficit (its kind), or null. */
  otherCause: string | null;
  /** Whether a trap alarm is open on the unit (hysteresis band). */
  open: boolean;
  /** Units of the site with a trap holding now (for severity). */
  trappedAtSite: number;
}

const PEER_MAX_AGE_MS = 120_000;

/** Both detectors of a pair read something (neither a small fraction of the other). */
const pairOk = (a: number, b: number, s: HealthSettings) => Math.min(a, b) >= s.trapPairSanity * Math.max(a, b);
/** A pair's ratio agrees with the modelled ratio at the unit's orientation (or the model cannot say). */
const pairAgrees = (p: number, q: number, mp: number, mq: number, s: HealthSettings) =>
  mp <= 0 || mq <= 0 || q <= 0 || Math.abs(p / q / (mp / mq) - 1) <= s.trapPairModelTolerance;

export class TrapDetector {
  private readonly lastSettledMs = new Map<number, number>();

  assess(unit: UnitRef, t: Telemetry, atMs: number, ctx: TrapContext, s: HealthSettings): Assessment {
    if (MOTION_FREE_MODES.has(t.mode) || unit.onHold) return judged(false);
    if (!ctx.daylight) return judged(false);
    if (ctx.otherCause) return judged(false);
    const m = ctx.model;
    if (!m) return judged(null);
    if (t.mode === 'settled') this.lastSettledMs.set(unit.unitId, atMs);
    else {
      const last = this.lastSettledMs.get(unit.unitId);
      // A short re-seek (the local maximum moves with the sun) keeps the state; a long one means the unit is climbing.
      if (last !== undefined && atMs - last < s.trapSeekGraceMin * 60_000) return judged(null);
      return judged(false);
    }
    if (!pairOk(t.tiltPlusWm2, t.tiltMinusWm2, s) || !pairOk(t.azimuthPlusWm2, t.azimuthMinusWm2, s)) return judged(false);
    const best = m.globalMax.wm2;
    if (best < s.trapMinBestWm2) return judged(false);
    const peers = ctx.peerLevels.without(unit.unitId, s.trapPeerQuantile);
    const peerHigh = peers.quantileWm2;
    // A brighter orientation is what the model says or what the peers measure, whichever is more: a model dimmer than
    // the site (a facade that mirrors more than surveyed) must not hide a unit well below units facing the peak.
    const bestSeen = Math.max(best, peerHigh ?? 0);
    const ratio = t.poaWm2 / bestSeen;
    // The modelled readings cost a harmonic evaluation per detector: they are asked for only where the answer depends
    // on them. At or above the trap ratio with no trap open, the answer is false whatever the pairs read; between the
    // two ratios with a trap open, it is "unknown" whatever they read (the same answers as the checks below give).
    if (ratio >= s.trapRatio && !ctx.open) return judged(false);
    if (ratio >= s.trapRatio && ratio < s.trapClearRatio) return judged(null);
    // The pairs must read what the model says they should read here: a unit balanced on a drifting detector is a sensor
    // fault (the drift detector's), not a trap.
    const mr = m.readings(t.tiltDeg, t.azimuthDeg, unit.detectorTiltDeg);
    if (
      !pairAgrees(t.tiltPlusWm2, t.tiltMinusWm2, mr.tiltPlusWm2, mr.tiltMinusWm2, s) ||
      !pairAgrees(t.azimuthPlusWm2, t.azimuthMinusWm2, mr.azimuthPlusWm2, mr.azimuthMinusWm2, s)
    )
      return judged(ctx.open ? null : false);
    if (ratio >= s.trapClearRatio) return judged(false);
    if (ratio >= s.trapRatio) return judged(ctx.open ? null : false);
    // Without two comparable peers (a small site, the others stowed or away) the peers cannot speak against the model,
    // so the model must be confirmed at the unit's own orientation, as for a site-wide trap.
    const belowPeers = peerHigh !== null && t.poaWm2 < s.trapPeerRatio * peerHigh;
    const here = mr.panelWm2;
    const modelConfirmed = here > 0 && Math.abs(t.poaWm2 / here - 1) <= s.trapModelAgreement;
    if (!belowPeers && !modelConfirmed) return judged(ctx.open ? null : false);
    return judged(true, () => {
      const a = m.analyse?.() ?? {};
      const minTilt = a.minSinglePeakDetectorTiltDeg ?? m.minSinglePeakDetectorTiltDeg;
      const lossWm2 = bestSeen - t.poaWm2;
      const lossPct = (lossWm2 / bestSeen) * 100;
      const g = m.globalMax;
      const tiltAdvice =
        minTilt == null
          ? 'no detector tilt up to 30° makes this sky single-peaked, so plan periodic scans'
          : minTilt > unit.detectorTiltDeg
            ? `raise the detector tilt from ${round1(unit.detectorTiltDeg)}° to at least ${round1(minTilt)}°, the smallest that leaves this site's landscape a single peak`
            : `the detector tilt (${round1(unit.detectorTiltDeg)}°) already exceeds the site's single-peak tilt (${round1(minTilt)}°) for this sky; check the detectors and the deadband`;
      return {
        severity: ctx.trappedAtSite >= s.trapManyUnits ? 'P2' : 'P3',
        message:
          `Settled at tilt ${round1(t.tiltDeg)}°, azimuth ${round1(t.azimuthDeg)}° on ${round1(t.poaWm2)} W/m² while ` +
          (bestSeen > best
            ? `its site's units get up to ${round1(bestSeen)} W/m², more than the modelled brightest orientation (tilt ${round1(g.tiltDeg)}°, azimuth ${round1(g.azimuthDeg)}°, ${round1(best)} W/m²)`
            : `the brightest orientation (tilt ${round1(g.tiltDeg)}°, azimuth ${round1(g.azimuthDeg)}°) gets ${round1(best)} W/m²`) +
          `: losing ${round1(lossWm2)} W/m² (${round1(lossPct)} %).`,
        advice: `Send a scan, then go to the brightest orientation it finds; ${tiltAdvice}.`,
        evidence: {
          readings: readingsSnapshot(t),
          model: {
            atMs: m.atMs,
            globalMax: g,
            modelledHereWm2: round1(here),
            localMaxima: a.localMaxima ?? m.localMaxima,
            minSinglePeakDetectorTiltDeg: minTilt ?? null,
            sunElevationDeg: round1(m.sunElevationDeg),
          },
          lossWm2: round1(lossWm2),
          lossPct: round1(lossPct),
          peers: { count: peers.count, upperQuartileWm2: peerHigh === null ? null : round1(peerHigh) },
          siteWide: peerHigh !== null && !belowPeers,
          detectorTiltDeg: unit.detectorTiltDeg,
        },
      };
    });
  }

  forget(unitId: number): void {
    this.lastSettledMs.delete(unitId);
  }
}
