import { describe, expect, it } from 'vitest';
import { siteModelOf, siteSky } from '../../server/health/site-sky';
import { DEMO_SURVEYS } from '../../seeds/demo-world';
import { demoSiteInfo } from '../../simulator/demo-fleet';
import { siteModels } from './eval-models';
import { runEval, SCORED_KINDS } from './run-eval';

const AT = Date.parse('2026-05-04T11:00:00Z');
const SITES = ['QHL', 'QED'].map((code, i) => ({ siteId: i + 1, site: demoSiteInfo(code) }));
const reading = { v: 1 as const, ts: new Date(AT - 60_000).toISOString(), ghiWm2: 700, dhiWm2: 150, airTempC: 15, windMs: 3, gustMs: 4 };

function modelsAt(surveyError: 'none' | 'low' | 'high', seed = 1) {
  const p = siteModels({ now: () => AT, sites: SITES, surveyError, seed });
  p.weather(2, reading);
  return { p, qhl: p.siteModel(1, AT)!, qed: p.siteModel(2, AT)! };
}

describe('offline evaluation with the site model (the server’s survey and station path)', () => {
  it('builds the model with the server’s own code from the survey the seed stores and the station reading', () => {
    const { qhl, qed } = modelsAt('none');
    const site = demoSiteInfo('QED');
    const direct = siteModelOf(siteSky(site, DEMO_SURVEYS['QED']!, AT, { ghiWm2: 700, dhiWm2: 150 }), false, AT, 85);
    expect(qed.globalMax).toEqual(direct.globalMax);
    expect(qed.readings(30, 180, 10)).toEqual(direct.readings(30, 180, 10));
    const qhlDirect = siteModelOf(siteSky(demoSiteInfo('QHL'), DEMO_SURVEYS['QHL']!, AT, null), false, AT, 85);
    expect(qhl.globalMax).toEqual(qhlDirect.globalMax);
  });

  it('gives the model a different survey and station reading with survey error, the same for the same seed', () => {
    const none = modelsAt('none');
    const high = modelsAt('high');
    expect(high.p.surveys.get(1)).not.toEqual(none.p.surveys.get(1));
    expect(high.p.surveys.get(1)).toEqual(modelsAt('high').p.surveys.get(1));
    // Facade on the glass-tower roof: reflectance and azimuth change what a south-facing unit sees at midday.
    const q0 = none.qhl.readings(60, 0, 10).panelWm2;
    const q1 = high.qhl.readings(60, 0, 10).panelWm2;
    expect(Math.abs(q1 / q0 - 1)).toBeGreaterThan(0.005);
    // The station's gain error scales the open yard's modelled best orientation.
    expect(Math.abs(high.qed.globalMax.wm2 / none.qed.globalMax.wm2 - 1)).toBeGreaterThan(0.005);
    expect(Math.abs(high.qed.globalMax.wm2 / none.qed.globalMax.wm2 - 1)).toBeLessThan(0.2);
  });

  it('is rebuilt every 5 minutes of site time, and not used 15 minutes away from its instant', () => {
    let now = AT;
    const p = siteModels({ now: () => now, sites: SITES, surveyError: 'none', seed: 1 });
    const m = p.siteModel(2, now)!;
    now += 4 * 60_000;
    expect(p.siteModel(2, now)).toBe(m);
    now += 2 * 60_000;
    expect(p.siteModel(2, now)).not.toBe(m);
    expect(p.siteModel(2, now + 16 * 60_000)).toBeUndefined();
    expect(p.built()).toBe(2);
  });

  it('reports the model and the survey error with today’s keys, and a Wilson interval with the count behind each figure', () => {
    const { result } = runEval({ seed: 2, units: 4, hours: 6, model: 'site', surveyError: 'high' });
    const json = JSON.parse(JSON.stringify(result)) as Record<string, unknown>;
    for (const key of [
      'seed',
      'unitDays',
      'detectors',
      'falseAlarmsPer100UnitDays',
      'falseAlarms',
      'otherAlarms',
      'injected',
      'faultFree',
      'runtimeS',
    ])
      expect(json).toHaveProperty(key);
    expect(json).toMatchObject({ model: 'site', surveyError: 'high', seed: 2, unitDays: 1 });
    for (const k of SCORED_KINDS) {
      const d = result.detectors[k];
      expect(Object.keys(d).sort()).toEqual(
        ['alarms', 'eligible', 'found', 'matched', 'medianDelayMin', 'precision', 'precisionCi95', 'recall', 'recallCi95', 'truths'].sort(),
      );
      if (d.alarms > 0) {
        expect(d.precision).toBeCloseTo(d.matched / d.alarms, 3);
        expect(d.precisionCi95![0]).toBeLessThanOrEqual(d.precision!);
        expect(d.precisionCi95![1]).toBeGreaterThanOrEqual(d.precision!);
      } else expect(d.precisionCi95).toBeNull();
      if (d.eligible === 0) expect(d.recallCi95).toBeNull();
    }
  }, 120_000);
});
