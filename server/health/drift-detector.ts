/**
 * Detector mismatch, drift, dead or saturated detector. A unit's closed loop balances its pairs whatever their gains, so a
 * pair that has drifted still reads "balanced": the raw imbalance says little. Instead each detector is compared with what
 * it should read where the unit points: its reading over the modelled reading at its normal, divided by the same ratio
 * for the in-plane reference cell. A healthy detector gives 1 (within its calibration); a drifting one departs from 1;
 * a dead one gives about 0; a saturated one reads at full scale. Only instants where the pair should agree with the model
 * are used: daylight, enough light on the detector, and model and reference cell agreeing (so clouds passing between
 * report and model, or an unsurveyed obstruction, are left out). The median over a window smooths what remains.
 */
import { detectorWords } from '../../shared/contracts/plain-words';
import type { Telemetry } from '../../shared/contracts/wire';
import type { HealthSettings } from './health-settings';
import type { ModelReadings, SiteModel } from './site-model';
import { judged, median, readingsSnapshot, round1, type Assessment, type UnitRef } from './unit-sample';

export const DETECTORS = ['tiltPlus', 'tiltMinus', 'azimuthPlus', 'azimuthMinus'] as const;
/** Index of each detector's partner in its pair. */
const PARTNER = [1, 0, 3, 2] as const;
type Detector = (typeof DETECTORS)[number];

interface UnitState {
  window: { atMs: number; x: (number | null)[] }[];
  judgedMs: number;
  sampledMs: number;
  /** The modelled readings last worked out for the unit, and what they were for (a settled unit asks the same again). */
  modelled?: ModelledHere;
}

/** Modelled readings at a unit's orientation (`here`) and around it (`around`, worked out only when asked for). */
interface ModelledHere {
  model: SiteModel;
  tiltDeg: number;
  azimuthDeg: number;
  detectorTiltDeg: number;
  toleranceDeg: number;
  here: ModelReadings;
  around?: ModelReadings[];
}

/** Reports closer together than this add no sample (the window needs a few dozen, not every report) [ms]. */
const SAMPLE_EVERY_MS = 15_000;

/** Medians are recomputed at most this often per unit [ms]; reports in between add samples only. */
const JUDGE_EVERY_MS = 30_000;

export class DriftDetector {
  private readonly units = new Map<number, UnitState>();

  assess(
    unit: UnitRef,
    t: Telemetry,
    atMs: number,
    model: SiteModel | undefined,
    daylight: boolean,
    open: boolean,
    s: HealthSettings,
  ): Assessment {
    let u = this.units.get(unit.unitId);
    if (!u) this.units.set(unit.unitId, (u = { window: [], judgedMs: -Infinity, sampledMs: -Infinity }));
    const windowMs = s.driftWindowMin * 60_000;
    while (u.window.length && atMs - u.window[0]!.atMs > windowMs) u.window.shift();
    if (!daylight || !model || t.mode === 'fault' || atMs - u.sampledMs < SAMPLE_EVERY_MS) return judged(null);
    u.sampledMs = atMs;
    // The model's readings cost a harmonic evaluation per normal (25 here); a settled unit points the same way report
    // after report and a site model serves minutes, so they are worked out again only when one of those changed.
    const tol = s.driftPointingToleranceDeg;
    let mh = u.modelled;
    if (
      !mh ||
      mh.model !== model ||
      mh.tiltDeg !== t.tiltDeg ||
      mh.azimuthDeg !== t.azimuthDeg ||
      mh.detectorTiltDeg !== unit.detectorTiltDeg ||
      mh.toleranceDeg !== tol
    ) {
      const here = model.readings(t.tiltDeg, t.azimuthDeg, unit.detectorTiltDeg);
      u.modelled = mh = {
        model,
        tiltDeg: t.tiltDeg,
        azimuthDeg: t.azimuthDeg,
        detectorTiltDeg: unit.detectorTiltDeg,
        toleranceDeg: tol,
        here,
      };
    }
    const m = mh.here;
    if (m.panelWm2 < s.driftMinWm2 || t.poaWm2 < s.driftMinWm2) return judged(null);
    const ref = t.poaWm2 / m.panelWm2;
    if (Math.abs(ref - 1) > s.driftModelAgreement) return judged(null);
    // Smooth enough here that the pointing uncertainty cannot explain a deviation?
    const azTol = tol / Math.max(0.2, Math.sin((t.tiltDeg * Math.PI) / 180));
    const around = (mh.around ??= [
      model.readings(t.tiltDeg + tol, t.azimuthDeg, unit.detectorTiltDeg),
      model.readings(Math.max(0, t.tiltDeg - tol), t.azimuthDeg, unit.detectorTiltDeg),
      model.readings(t.tiltDeg, t.azimuthDeg + azTol, unit.detectorTiltDeg),
      model.readings(t.tiltDeg, t.azimuthDeg - azTol, unit.detectorTiltDeg),
    ]);
    const steep = (d: 'panel' | Detector) =>
      around.some((r) => Math.abs(r[`${d}Wm2` as const] / m[`${d}Wm2` as const] - 1) > s.driftMaxModelChange);
    if (steep('panel')) return judged(null);
    const reading = (d: Detector) => t[`${d}Wm2` as const];
    const modelled = (d: Detector) => m[`${d}Wm2` as const];
    const x = DETECTORS.map((d) => {
      if (reading(d) >= s.saturationWm2) return Infinity;
      return modelled(d) >= s.driftMinWm2 && !steep(d) ? reading(d) / modelled(d) / ref : null;
    });
    u.window.push({ atMs, x });
    if (atMs - u.judgedMs < JUDGE_EVERY_MS) return judged(null);
    u.judgedMs = atMs;
    const medians = DETECTORS.map((_, i) => {
      const xs = u.window.map((w) => w.x[i]!).filter((v): v is number => v !== null);
      return xs.length >= 5 ? median(xs) : null;
    });
    // A pair is judged as a pair: a model whose slope is off where the unit points (a sky shaped otherwise than
    // modelled, a stale model under passing cloud) skews the two detectors of a pair opposite ways, while a drifting
    // detector departs alone. So a detector's departure counts net of its partner's (x · x_partner − 1: a skew
    // multiplies one by what it divides the other), and is charged to whichever of the two departs further. A dead or
    // saturated reading needs no partner.
    const devs = medians.map((v, i) => {
      if (v === null) return null;
      if (v === Infinity || v < s.deadFraction) return Math.abs(v - 1);
      const p = medians[PARTNER[i]!];
      if (p === null || p === undefined || p === Infinity || p < s.deadFraction) return null;
      return Math.abs(v - 1) >= Math.abs(p - 1) ? Math.abs(v * p - 1) : 0;
    });
    const known = devs.filter((v): v is number => v !== null);
    if (known.length === 0) return judged(null);
    const worst = devs.reduce<{ i: number; dev: number }>((b, d, i) => (d !== null && d > b.dev ? { i, dev: d } : b), { i: -1, dev: 0 });
    if (worst.dev > s.driftTolerance) {
      const name = DETECTORS[worst.i]!;
      const words = detectorWords(name);
      const v = medians[worst.i]!;
      const kind = v === Infinity ? 'saturated' : v < s.deadFraction ? 'dead' : 'drifting';
      return judged(true, () => ({
        severity: kind === 'drifting' ? 'P4' : 'P3',
        message:
          kind === 'saturated'
            ? `The ${words} reads at full scale (${round1(reading(name))} W/m²).`
            : kind === 'dead'
              ? `The ${words} reads ${round1(v * 100)} % of what it should (dead or disconnected).`
              : `The ${words} reads ${round1(v * 100)} % of what it should where the unit points (gain drift ${round1((v - 1) * 100)} %); the unit balances on a skewed pair and points off its peak.`,
        advice: `Clean and inspect the ${words} and its connector; recalibrate the pair or replace the detector. Until then the unit tracks with an offset.`,
        evidence: {
          readings: readingsSnapshot(t),
          modelled: Object.fromEntries(DETECTORS.map((d) => [d, round1(modelled(d))])),
          modelledPanelWm2: round1(m.panelWm2),
          normalisedMedian: Object.fromEntries(
            DETECTORS.map((d, i) => [d, medians[i] === null ? null : Math.round(medians[i]! * 1000) / 1000]),
          ),
          detector: name,
          finding: kind,
          windowMin: s.driftWindowMin,
        },
      }));
    }
    if (worst.dev < s.driftClearTolerance && known.length >= 2) return judged(false);
    return judged(open ? null : false);
  }

  forget(unitId: number): void {
    this.units.delete(unitId);
  }
}
