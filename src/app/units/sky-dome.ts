import type { EChartsCoreOption } from 'echarts/core';
import type { TonePalette } from '../live/tone-palette';
import { wrap360 } from '../../../shared/sphere/directions';

/** A marked direction on the sky dome. */
export interface DomePoint {
  name: string;
  azimuthDeg: number;
  elevationDeg: number;
  symbol: string;
  size: number;
  colour: string;
  /** Text next to the marker. */
  label?: string;
}

export interface DomeReflector {
  azimuthFromDeg: number;
  azimuthToDeg: number;
  elevationFromDeg: number;
  elevationToDeg: number;
}

export interface SkyDome {
  points: DomePoint[];
  horizon?: readonly (readonly [number, number])[];
  reflectors?: readonly DomeReflector[];
  sunPath?: readonly { azimuthDeg: number; elevationDeg: number }[];
}

const COMPASS: Record<number, string> = { 0: 'N', 45: 'NE', 90: 'E', 135: 'SE', 180: 'S', 225: 'SW', 270: 'W', 315: 'NW' };

/** The panel normal as a sky direction: a panel tilted t° looks at elevation 90° − t. */
export function normalToDome(tiltDeg: number, azimuthDeg: number): { azimuthDeg: number; elevationDeg: number } {
  return { azimuthDeg: wrap360(azimuthDeg), elevationDeg: 90 - tiltDeg };
}

/** Polar radius of an elevation: the zenith is the centre, the horizon the rim. Below-horizon points sit on the rim. */
export const domeRadius = (elevationDeg: number) => Math.min(90, Math.max(0, 90 - elevationDeg));

/** Horizon elevation at every whole azimuth (piecewise linear, periodic), for drawing. */
export function horizonLine(profile: readonly (readonly [number, number])[]): [number, number][] {
  if (!profile.length) return [];
  const pts = [...profile].sort((a, b) => a[0] - b[0]);
  const at = (az: number): number => {
    const ext = [...pts.map(([a, e]) => [a - 360, e] as const), ...pts, ...pts.map(([a, e]) => [a + 360, e] as const)];
    let prev = ext[0]!;
    for (const p of ext) {
      if (p[0] >= az) {
        if (p[0] === prev[0]) return p[1];
        return prev[1] + ((p[1] - prev[1]) * (az - prev[0])) / (p[0] - prev[0]);
      }
      prev = p;
    }
    return prev[1];
  };
  const out: [number, number][] = [];
  for (let az = 0; az <= 360; az += 2) out.push([az, at(az % 360)]);
  return out;
}

/**
 * Sky dome in ECharts' polar system: azimuth around (north up, clockwise), elevation inward (horizon at the rim,
 * zenith in the centre).
 */
export function skyDomeOptions(d: SkyDome, palette: TonePalette): EChartsCoreOption {
  const series: unknown[] = [];
  if (d.horizon?.length) {
    series.push({
      name: 'Horizon profile',
      type: 'line',
      coordinateSystem: 'polar',
      showSymbol: false,
      lineStyle: { color: palette.muted, width: 2 },
      areaStyle: undefined,
      data: horizonLine(d.horizon).map(([az, el]) => [domeRadius(el), az]),
      tooltip: { show: false },
    });
  }
  for (const [i, r] of (d.reflectors ?? []).entries()) {
    const span = wrap360(r.azimuthToDeg - r.azimuthFromDeg);
    const edge: [number, number][] = [];
    for (let k = 0; k <= 12; k++) edge.push([domeRadius(r.elevationFromDeg), r.azimuthFromDeg + (span * k) / 12]);
    for (let k = 12; k >= 0; k--) edge.push([domeRadius(r.elevationToDeg), r.azimuthFromDeg + (span * k) / 12]);
    edge.push(edge[0]!);
    series.push({
      name: i === 0 ? 'Reflecting facade' : `Reflecting facade ${i + 1}`,
      type: 'line',
      coordinateSystem: 'polar',
      showSymbol: false,
      lineStyle: { color: palette.accent, width: 2, type: 'dashed' },
      data: edge.map(([rad, az]) => [rad, wrap360(az)]),
      tooltip: { show: false },
    });
  }
  if (d.sunPath?.length) {
    series.push({
      name: 'Sun path today',
      type: 'line',
      coordinateSystem: 'polar',
      showSymbol: false,
      lineStyle: { color: palette.accent, width: 1, type: 'dotted' },
      data: d.sunPath.map((p) => [domeRadius(p.elevationDeg), p.azimuthDeg]),
      tooltip: { show: false },
    });
  }
  for (const p of d.points) {
    series.push({
      name: p.name,
      type: 'scatter',
      coordinateSystem: 'polar',
      symbol: p.symbol,
      symbolSize: p.size,
      itemStyle: { color: p.colour, borderColor: palette.surface, borderWidth: 1 },
      label: { show: Boolean(p.label), formatter: p.label ?? '', position: 'right', color: palette.text, fontSize: 11 },
      data: [{ value: [domeRadius(p.elevationDeg), p.azimuthDeg], el: p.elevationDeg }],
    });
  }
  return {
    animation: false,
    legend: { bottom: 0, textStyle: { color: palette.text }, type: 'scroll' },
    tooltip: {
      trigger: 'item',
      formatter: (x: { seriesName: string; data: { value: number[]; el: number } }) =>
        `${x.seriesName}<br>azimuth ${Math.round(x.data.value[1]!)}°, elevation ${Math.round(x.data.el)}°`,
    },
    polar: { radius: ['0%', '72%'], center: ['50%', '45%'] },
    angleAxis: {
      type: 'value',
      min: 0,
      max: 360,
      interval: 45,
      startAngle: 90,
      clockwise: true,
      axisLabel: { color: palette.muted, formatter: (v: number) => `${COMPASS[v] ?? ''} ${v}°` },
      splitLine: { show: true, lineStyle: { color: palette.grid } },
      axisLine: { lineStyle: { color: palette.grid } },
    },
    radiusAxis: {
      type: 'value',
      min: 0,
      max: 90,
      interval: 30,
      axisLabel: { color: palette.muted, formatter: (v: number) => `${90 - v}°`, fontSize: 10 },
      splitLine: { lineStyle: { color: palette.grid, type: 'dashed' } },
    },
    series,
  };
}
