import { TestBed } from '@angular/core/testing';
import { provideEchartsCore } from 'ngx-echarts';
import type { SiteLandscape } from '../../../shared/contracts/landscape';
import type { UnitLiveState } from '../../../shared/contracts/live';
import { domePoints, PointingPanel } from './pointing-panel';
import { domeRadius, horizonLine, normalToDome } from './sky-dome';

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

describe('where it points', () => {
  it('puts the panel normal on the sky dome (tilt 30° looks at elevation 60°) with the zenith in the centre', () => {
    expect(normalToDome(30, 190)).toEqual({ azimuthDeg: 190, elevationDeg: 60 });
    expect(normalToDome(0, -10).azimuthDeg).toBe(350);
    expect(domeRadius(90)).toBe(0);
    expect(domeRadius(0)).toBe(90);
    expect(domeRadius(-5)).toBe(90);
    const h = horizonLine([
      [0, 10],
      [90, 30],
    ]);
    expect(h.find(([az]) => az === 44)![1]).toBeCloseTo(19.78, 1);
    expect(h.find(([az]) => az === 226)![1]).toBeCloseTo(20, 0);
  });

  it('marks the lesser peaks, the modelled best with its basin, the sun and the panel, hollow when the unit is not reporting', () => {
    const l = {
      globalMax: { tiltDeg: 30, azimuthDeg: 178, wm2: 860.4 },
      localMaxima: [
        { tiltDeg: 30, azimuthDeg: 178, wm2: 860.4, basinShare: 0.71 },
        { tiltDeg: 52, azimuthDeg: 250, wm2: 410.2, basinShare: 0.29 },
      ],
      sun: { azimuthDeg: 120, elevationDeg: 40 },
    } as unknown as SiteLandscape;
    const s = { serial: 'QHL-2401', tiltDeg: 52, azimuthDeg: 250 } as UnitLiveState;
    const pts = domePoints(l, s, 'good', palette);
    expect(pts.map((p) => [p.name, p.label, p.symbol])).toEqual([
      ['Lesser peak', '410 W/m² · basin 29 %', 'diamond'],
      ['Modelled best', 'best 860 W/m² · basin 71 %', 'pin'],
      ['Sun', 'sun', 'circle'],
      ['Panel points here', 'QHL-2401', 'triangle'],
    ]);
    expect(pts[1]).toMatchObject({ azimuthDeg: 178, elevationDeg: 60 });
    expect(domePoints(null, s, 'stopped', palette)).toEqual([
      expect.objectContaining({ name: 'Panel points here', symbol: 'emptyCircle' }),
    ]);
    expect(domePoints(null, { ...s, tiltDeg: null } as unknown as UnitLiveState, 'good', palette)).toEqual([]);
  });
});

describe('PointingPanel model details', () => {
  const landscape = {
    globalMax: { tiltDeg: 30, azimuthDeg: 178, wm2: 860 },
    localMaxima: [{ tiltDeg: 30, azimuthDeg: 178, wm2: 860, basinShare: 1 }],
    sun: null,
    minSinglePeakDetectorTiltDeg: null,
    magnitudeSource: 'Ineichen–Perez clear sky (TL 3)',
  } as unknown as SiteLandscape;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideEchartsCore({ echarts: () => new Promise<never>(() => undefined) })] });
  });

  async function hint(showModelSource: boolean): Promise<string> {
    const fixture = TestBed.createComponent(PointingPanel);
    fixture.componentRef.setInput('landscape', landscape);
    fixture.componentRef.setInput('showModelSource', showModelSource);
    await fixture.whenStable();
    return (fixture.nativeElement as HTMLElement).textContent!.replace(/\s+/g, ' ');
  }

  it('names the model behind the magnitudes only where asked (engineers and admins), never to technicians or crews', async () => {
    expect(await hint(false)).not.toContain('Magnitudes');
    expect(await hint(false)).toContain('One peak in the modelled landscape.');
    expect(await hint(true)).toContain('Magnitudes: Ineichen–Perez clear sky (TL 3).');
  });
});
