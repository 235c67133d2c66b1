import { describe, expect, it } from 'vitest';
import { analyseLandscape, buildSky } from '../../shared/landscape/index';
import {
  dayDetectorTilt,
  mergeDayDetectorTilts,
  recommendDetectorTilt,
  worstDay,
  type DayDetectorTilt,
} from '../../shared/landscape/detector-tilt';
import { testSkies } from './test-skies';

const facade = buildSky(testSkies['clear sky with a glass facade reflecting the sun']!);
const twoFacades = buildSky(testSkies['two facades, turbid sky']!);
const overcast = buildSky(testSkies['CIE overcast']!);
const at = (h: number) => Date.UTC(2026, 5, 21, h);

describe('dayDetectorTilt: the largest single-peak detector tilt over a day', () => {
  it('is the largest of the per-instant values the landscape engine finds, at the instant that needs it', () => {
    const step = 5;
    const single = (sky: typeof facade) => analyseLandscape(sky, { stepDeg: step, maxDetectorTiltDeg: 30 }).minSinglePeakDetectorTiltDeg!;
    const d = dayDetectorTilt(
      {
        date: '2026-06-21',
        instants: [
          { atMs: at(8), sky: overcast },
          { atMs: at(10), sky: facade },
          { atMs: at(12), sky: twoFacades },
        ],
      },
      { stepDeg: step },
    );
    const values = [single(overcast), single(facade), single(twoFacades)];
    // The overcast sky has one peak: the search's smallest tilt (analyseLandscape's rule); the facade needs much more.
    expect(values[0]).toBe(0.5);
    expect(values[1]).toBeGreaterThan(10);
    expect(d.singlePeakDetectorTiltDeg).toBe(Math.max(...values));
    expect(d.worstAtMs).toBe([at(8), at(10), at(12)][values.indexOf(Math.max(...values))]);
    expect(d).toMatchObject({ date: '2026-06-21', instants: 3, instantsWithoutSinglePeak: 0 });
    expect(d.maxPeaks).toBeGreaterThanOrEqual(2);
  });

  it('leaves out instants too dim to judge traps in (their modelled best below minBestWm2)', () => {
    // The overcast test sky's best is about its 150 W/m² of diffuse light; the facade sky's is well above 700 W/m².
    const instants = [
      { atMs: at(8), sky: overcast },
      { atMs: at(10), sky: facade },
    ];
    const all = dayDetectorTilt({ date: '2026-06-21', instants }, { stepDeg: 5 });
    const bright = dayDetectorTilt({ date: '2026-06-21', instants }, { stepDeg: 5, minBestWm2: 400 });
    expect(all).toMatchObject({ instants: 2, instantsTooDim: 0 });
    expect(bright).toMatchObject({ instants: 1, instantsTooDim: 1, worstAtMs: at(10) });
    expect(bright.singlePeakDetectorTiltDeg).toBe(all.singlePeakDetectorTiltDeg);
    const dim = dayDetectorTilt({ date: '2026-06-21', instants }, { stepDeg: 5, minBestWm2: 5000 });
    expect(dim).toMatchObject({ instants: 0, instantsTooDim: 2, singlePeakDetectorTiltDeg: null });
  });

  it('gives the same day judged an instant at a time and merged as judged at once', () => {
    const instants = [
      { atMs: at(8), sky: overcast },
      { atMs: at(10), sky: facade },
      { atMs: at(12), sky: twoFacades },
      { atMs: at(14), sky: facade },
    ];
    const whole = dayDetectorTilt({ date: '2026-06-21', instants }, { stepDeg: 5, maxDetectorTiltDeg: 12 });
    const parts = instants.map((i) => dayDetectorTilt({ date: '2026-06-21', instants: [i] }, { stepDeg: 5, maxDetectorTiltDeg: 12 }));
    expect(mergeDayDetectorTilts('2026-06-21', parts)).toEqual(whole);
    expect(whole.instants).toBe(4);
  });

  it('counts instants that no tilt up to the maximum makes single-peaked, and a dark day judges nothing', () => {
    const d = dayDetectorTilt({ date: '2026-06-21', instants: [{ atMs: at(10), sky: facade }] }, { stepDeg: 5, maxDetectorTiltDeg: 2 });
    expect(d).toMatchObject({ instants: 1, singlePeakDetectorTiltDeg: null, worstAtMs: null, instantsWithoutSinglePeak: 1 });
    expect(dayDetectorTilt({ date: '2026-12-21', instants: [] })).toEqual({
      date: '2026-12-21',
      instants: 0,
      instantsTooDim: 0,
      singlePeakDetectorTiltDeg: null,
      worstAtMs: null,
      instantsWithoutSinglePeak: 0,
      maxPeaks: 0,
    });
  });
});

const day = (date: string, tilt: number | null, without = 0, instants = 10): DayDetectorTilt => ({
  date,
  instants,
  instantsTooDim: 0,
  singlePeakDetectorTiltDeg: tilt,
  worstAtMs: null,
  instantsWithoutSinglePeak: without,
  maxPeaks: 2,
});

describe('worstDay and recommendDetectorTilt', () => {
  it('the worst day is the one needing the largest tilt; a day with an unresolved instant is worse still; dark days last', () => {
    expect(worstDay([day('01-21', 6), day('02-21', 14.5), day('03-21', 9)])!.date).toBe('02-21');
    expect(worstDay([day('01-21', 6), day('02-21', 14.5), day('03-21', 3, 1)])!.date).toBe('03-21');
    expect(worstDay([day('12-21', null, 0, 0), day('01-21', 0.5)])!.date).toBe('01-21');
    expect(worstDay([day('01-21', 8), day('02-21', 8)])!.date).toBe('01-21'); // the earliest of equals
    expect(worstDay([])).toBeUndefined();
  });

  it('adds the margin and rounds up to the 0.5° grid units take, within 0.5…45°', () => {
    expect(recommendDetectorTilt(day('d', 14.5))).toEqual({ detectorTiltDeg: 16.5, capped: false }); // default margin 2°
    expect(recommendDetectorTilt(day('d', 14.5), 1.2)).toEqual({ detectorTiltDeg: 16, capped: false }); // 15.7 → 16
    expect(recommendDetectorTilt(day('d', 14.5), 0)).toEqual({ detectorTiltDeg: 14.5, capped: false });
    expect(recommendDetectorTilt(day('d', 44), 2)).toEqual({ detectorTiltDeg: 45, capped: true });
    expect(recommendDetectorTilt(day('d', null, 0, 0), 0)).toEqual({ detectorTiltDeg: 0.5, capped: false }); // dark: the smallest
  });

  it('gives null when no detector tilt makes the worst day single-peaked, and refuses a bad margin', () => {
    expect(recommendDetectorTilt(day('d', 10, 2))).toEqual({ detectorTiltDeg: null, capped: false });
    expect(recommendDetectorTilt(undefined)).toEqual({ detectorTiltDeg: null, capped: false });
    expect(() => recommendDetectorTilt(day('d', 10), -1)).toThrow(/marginDeg: must be a finite number in \[0, 10\]/);
    expect(() => recommendDetectorTilt(day('d', 10), Number.NaN)).toThrow(/marginDeg/);
  });
});
