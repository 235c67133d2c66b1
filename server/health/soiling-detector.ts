/**
 * Underperformance and soiling: DC power per in-plane irradiance, corrected to 25 °C module temperature, against the
 * unit's own clean history. The index P / (G_POA · (1 + γ·(T_mod − 25 °C))) is the unit's rated power per kW/m² when
 * clean, so rated power need not be known. The clean reference is a high quantile of the hourly medians of the history;
 * the current value is the median of the last hour. Loss = 1 − current / reference (the soiling ratio's complement, as
 * IEC 61724-1 defines the ratio). Soiling builds over days and vanishes with a cleaning or rain, which clears the alarm.
 */
import type { Telemetry } from '../../shared/contracts/wire';
import type { HealthSettings } from './health-settings';
import { judged, median, quantile, readingsSnapshot, round1, type Assessment, type UnitRef } from './unit-sample';

const HOUR_MS = 3_600_000;

interface UnitState {
  recent: { atMs: number; index: number }[];
  hourStartMs: number;
  hour: number[];
  hourly: { hourMs: number; median: number }[];
  judgedMs: number;
}

/** The index is judged at most this often per unit [ms]. */
const JUDGE_EVERY_MS = 5 * 60_000;

export class SoilingDetector {
  private readonly units = new Map<number, UnitState>();

  /** Performance index of one report, or null when it is not usable. */
  static index(t: Telemetry, s: HealthSettings): number | null {
    if (t.poaWm2 < s.soilingMinPoaWm2 || t.dcPowerW <= 0 || t.mode === 'fault') return null;
    const k = 1 + s.powerTempCoeffPerK * (t.moduleTempC - 25);
    return k > 0 ? t.dcPowerW / ((t.poaWm2 / 1000) * k) : null;
  }

  assess(unit: UnitRef, t: Telemetry, atMs: number, daylight: boolean, open: boolean, s: HealthSettings): Assessment {
    let u = this.units.get(unit.unitId);
    if (!u)
      this.units.set(
        unit.unitId,
        (u = { recent: [], hourStartMs: Math.floor(atMs / HOUR_MS) * HOUR_MS, hour: [], hourly: [], judgedMs: -Infinity }),
      );
    const hourMs = Math.floor(atMs / HOUR_MS) * HOUR_MS;
    if (hourMs > u.hourStartMs) {
      if (u.hour.length >= 20) u.hourly.push({ hourMs: u.hourStartMs, median: median(u.hour) });
      u.hour = [];
      u.hourStartMs = hourMs;
      const keepMs = s.soilingHistoryDays * 24 * HOUR_MS;
      while (u.hourly.length && hourMs - u.hourly[0]!.hourMs > keepMs) u.hourly.shift();
    }
    const idx = daylight ? SoilingDetector.index(t, s) : null;
    if (idx !== null && atMs >= u.hourStartMs) {
      u.hour.push(idx);
      u.recent.push({ atMs, index: idx });
    }
    while (u.recent.length && atMs - u.recent[0]!.atMs > HOUR_MS) u.recent.shift();
    if (idx === null || u.recent.length < 20 || u.hourly.length < s.soilingMinHours || atMs - u.judgedMs < JUDGE_EVERY_MS)
      return judged(null);
    u.judgedMs = atMs;
    const reference = quantile(
      u.hourly.map((h) => h.median),
      s.soilingReferenceQuantile,
    );
    const current = median(u.recent.map((r) => r.index));
    const loss = 1 - current / reference;
    if (loss > s.soilingLossThreshold) {
      return judged(true, () => ({
        severity: 'P4',
        message: `DC power for the light it gets is ${round1(loss * 100)} % below this unit's clean reference: corrected for temperature, it makes ${round1(current)} W for every 1000 W/m² in the plane of its modules, against ${round1(reference)} W when clean.`,
        advice:
          'Inspect and clean the modules (and the reference cell); if cleaning does not restore it, check strings, connectors and the inverter for degradation or a fault.',
        evidence: {
          readings: readingsSnapshot(t),
          lossPct: round1(loss * 100),
          currentIndex: round1(current),
          referenceIndex: round1(reference),
          historyHours: u.hourly.length,
          referenceQuantile: s.soilingReferenceQuantile,
        },
      }));
    }
    if (loss < s.soilingClearLoss) return judged(false);
    return judged(open ? null : false);
  }

  forget(unitId: number): void {
    this.units.delete(unitId);
  }
}
