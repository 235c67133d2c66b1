import { scanCells, scanFindings, scanHeatmapOptions } from './scan-chart';
import { scanResult } from '../testing/spec-fixtures';

const scan = scanResult;

const palette = {
  good: 'g',
  busy: 'b',
  caution: 'c',
  problem: 'p',
  stopped: 's',
  text: 't',
  muted: 'm',
  grid: 'x',
  surface: 'w',
  primary: 'pr',
  accent: 'a',
};

describe('scan result', () => {
  it('turns the raster into heat map cells, leaving out orientations without a sample', () => {
    const cells = scanCells(scan());
    expect(cells).toHaveLength(8);
    expect(cells).toContainEqual([1, 1, 850]);
    expect(cells.some(([j, i]) => i === 0 && j === 2)).toBe(false);
  });

  it('states the measured best, the comparison with the model and the expected gain', () => {
    const f = scanFindings(scan());
    expect(f.measuredBest).toBe('Brightest measured: 861 W/m² at tilt 31.2°, azimuth 178.4° (8 samples, 2 peaks).');
    expect(f.comparison).toContain('is 3.5° from the measured one; measured is 97.9 % of modelled');
    expect(f.gain).toBe('Expected gain: +349 W/m² (+68.2 %) over the 512 W/m² it had before the scan.');
    expect(f.worthMoving).toBe(true);
  });

  it('says when there is nothing to gain, or no reading before, or no model', () => {
    expect(scanFindings(scan({ expectedGainWm2: -5, expectedGainPct: -1 }))).toMatchObject({
      gain: 'No gain expected: it already had 512 W/m² before the scan.',
      worthMoving: false,
    });
    expect(scanFindings(scan({ beforeWm2: null, expectedGainWm2: null, expectedGainPct: null })).gain).toMatch(/unknown/);
    expect(scanFindings(scan({ model: null })).comparison).toBeNull();
    const night = scan({ model: { globalMax: { tiltDeg: 0, azimuthDeg: 0, wm2: 0 }, angleApartDeg: 30, measuredVsModelPct: 0 } });
    expect(scanFindings(night).comparison).toMatch(/almost no light/);
    expect((scanHeatmapOptions(night, palette) as { series: { name: string }[] }).series.map((x) => x.name)).not.toContain('Modelled best');
  });

  it('marks the measured best, the lesser peak and the modelled best by different shapes', () => {
    const o = scanHeatmapOptions(scan(), palette) as { series: { name: string; symbol?: string; data: unknown[] }[] };
    expect(o.series.map((s) => `${s.name}:${s.symbol ?? 'cells'}`)).toEqual([
      'Measured:cells',
      'Brightest measured:pin',
      'Lesser peak:diamond',
      'Modelled best:circle',
    ]);
    expect((o.series[1]!.data[0] as { value: number[] }).value).toEqual([1, 1]);
    expect(o.series[2]!.data).toHaveLength(1);
  });
});
