import type { UnitTraces } from '../../../shared/contracts/traces';
import { TRACE_QUANTITIES } from '../../../shared/contracts/traces';
import { readPalette } from '../live/tone-palette';
import { envelope, PANELS, traceChartOptions, zonedMidnightUtc } from './trace-charts';
import { needsDetail, presetWindow } from './trace-explorer';

const traces = (over: Partial<UnitTraces> = {}): UnitTraces => ({
  unitId: 1,
  serial: 'QHL-2401',
  from: '2026-06-21T00:00:00Z',
  to: '2026-06-22T00:00:00Z',
  bucketMs: 60_000,
  t: [0, 60_000],
  samples: [12, 12],
  series: Object.fromEntries(TRACE_QUANTITIES.map((q) => [q, { min: [1, 2], max: [5, 2] }])) as UnitTraces['series'],
  rows: 24,
  source: 'raw',
  events: [{ at: '1970-01-01T00:00:30Z', kind: 'mode-change', text: 'Mode changed → Scanning' }],
  alarms: null,
  modelledBest: { t: [0], wm2: [900] },
  ...over,
});

describe('trace explorer', () => {
  it('draws each bucket as its minimum and maximum so a spike survives, and breaks the line at gaps', () => {
    expect(envelope([0, 10, 20], [1, 2, 3], [9, 2, 3], 10)).toEqual([
      [0, 1],
      [5, 9],
      [10, 2],
      [20, 3],
    ]);
    // Starting near the previous end keeps the line short: after ending high at 9, the next bucket starts high.
    expect(envelope([0, 10], [1, 0], [9, 8], 10)).toEqual([
      [0, 1],
      [5, 9],
      [10, 8],
      [15, 0],
    ]);
    expect(envelope([0, 50], [1, 1], [1, 1], 10)).toEqual([
      [0, 1],
      [10, null],
      [50, 1],
    ]);
    expect(envelope([0], [null], [null], 10)).toEqual([[0, null]]);
  });

  it('stacks five linked panels, one series per quantity, events as marks, the modelled best with in-plane irradiance', () => {
    const o = traceChartOptions([traces()], readPalette(), 'Europe/Berlin', { fromMs: 0, toMs: 120_000 }) as {
      grid: unknown[];
      xAxis: { min: number; max: number }[];
      dataZoom: { xAxisIndex: number[] }[];
      series: { name: string; xAxisIndex: number; markLine?: { data: { xAxis: number }[] } }[];
    };
    expect(o.grid).toHaveLength(PANELS.length);
    expect(o.dataZoom.every((z) => z.xAxisIndex.length === PANELS.length)).toBe(true);
    expect(o.xAxis.every((x) => x.min === 0 && x.max === 120_000)).toBe(true);
    expect(o.series.filter((s) => s.xAxisIndex === 0).map((s) => s.name)).toEqual([
      'Tilt detector +',
      'Tilt detector −',
      'Azimuth detector +',
      'Azimuth detector −',
    ]);
    expect(o.series.filter((s) => s.xAxisIndex === 3).map((s) => s.name)).toEqual(['In-plane irradiance', 'Modelled best']);
    expect(o.series[0]!.markLine!.data.map((d) => d.xAxis)).toEqual([30_000]);
    const two = traceChartOptions([traces(), traces({ unitId: 2, serial: 'QHL-2402' })], readPalette(), 'UTC', { fromMs: 0, toMs: 1 }) as {
      series: { name: string }[];
    };
    expect(two.series.map((s) => s.name)).toContain('QHL-2402 DC power');
  });

  it('turns presets into windows; one day is the local calendar day of the site', () => {
    const now = Date.parse('2026-06-21T12:00:00Z');
    expect(presetWindow('hour', now, '', 'UTC')).toEqual({ fromMs: now - 3_600_000, toMs: now });
    expect(presetWindow('month', now, '', 'UTC').fromMs).toBe(now - 30 * 86_400_000);
    const day = presetWindow('day', now, '2026-06-20', 'Europe/Berlin');
    expect(new Date(day.fromMs).toISOString()).toBe('2026-06-19T22:00:00.000Z');
    expect(day.toMs - day.fromMs).toBe(86_400_000);
    // The spring change in Berlin has 23 hours.
    const spring = presetWindow('day', now, '2026-03-29', 'Europe/Berlin');
    expect(spring.toMs - spring.fromMs).toBe(23 * 3_600_000);
    expect(new Date(zonedMidnightUtc('2026-01-10', 'Europe/London')).toISOString()).toBe('2026-01-10T00:00:00.000Z');
  });

  it('asks for finer data only when a zoom shows too few loaded buckets', () => {
    expect(needsDetail({ bucketMs: 60_000 }, { fromMs: 0, toMs: 60 * 60_000 }, 1200)).toBe(true);
    expect(needsDetail({ bucketMs: 60_000 }, { fromMs: 0, toMs: 1000 * 60_000 }, 1200)).toBe(false);
    expect(needsDetail({ bucketMs: 1000 }, { fromMs: 0, toMs: 10_000 }, 1200)).toBe(false);
  });
});
