import type { EChartsCoreOption } from 'echarts/core';
import type { LandscapeDay, SiteLandscape } from '../../../shared/contracts/landscape';
import type { TonePalette } from '../live/tone-palette';

const COMPASS: Record<number, string> = { 0: 'N', 90: 'E', 180: 'S', 270: 'W' };

/** Index of the grid cell nearest an angle on an axis with a fixed step. */
function cellIndex(values: readonly number[], v: number): number {
  let best = 0;
  for (let i = 1; i < values.length; i++) if (Math.abs(values[i]! - v) < Math.abs(values[best]! - v)) best = i;
  return best;
}

/** Which maxima to mark and how: the global one as a pin, lesser ones as diamonds (shape differs, not only colour). */
export interface MaximaMark {
  name: string;
  tiltDeg: number;
  azimuthDeg: number;
  wm2: number;
  /** How far the peak stands out [W/m²]; null for a best that is not a peak (it lies on the unit's travel limit). */
  prominenceWm2: number | null;
  /** Share of orientations that climb to it; null for a best on the travel limit. */
  basinShare: number | null;
  best: boolean;
}

/**
 * The table and chart marks of a landscape: its peaks, the one holding the modelled best flagged. The best is searched
 * more finely than the grid the peaks lie on, so the peak within one grid step of it is the best's peak; when none is
 * (the best lies on the tilt limit, on a slope), the best gets its own row first.
 */
export function maximaMarks(l: SiteLandscape): MaximaMark[] {
  const g = l.globalMax;
  const near = (m: { tiltDeg: number; azimuthDeg: number }) =>
    Math.abs(m.tiltDeg - g.tiltDeg) <= l.stepDeg + 1e-9 && Math.abs(((m.azimuthDeg - g.azimuthDeg + 540) % 360) - 180) <= l.stepDeg + 1e-9;
  const bestIndex = l.localMaxima.findIndex(near);
  const peaks: MaximaMark[] = l.localMaxima.map((m, i) => ({
    name: i === bestIndex ? 'Modelled best (global peak)' : `Lesser peak ${i + (bestIndex >= 0 && i > bestIndex ? 0 : 1)}`,
    tiltDeg: m.tiltDeg,
    azimuthDeg: m.azimuthDeg,
    wm2: m.wm2,
    prominenceWm2: m.prominenceWm2,
    basinShare: m.basinShare,
    best: i === bestIndex,
  }));
  if (bestIndex >= 0) return peaks;
  return [
    {
      name: 'Modelled best (at the travel limit)',
      tiltDeg: g.tiltDeg,
      azimuthDeg: g.azimuthDeg,
      wm2: g.wm2,
      prominenceWm2: null,
      basinShare: null,
      best: true,
    },
    ...peaks,
  ];
}

/**
 * Heat map of a landscape grid over azimuth (x) × tilt (y) in W/m², with the maxima and the sun's direction marked.
 * `which` picks the raw grid or the one blurred by the detector pair.
 */
export function heatmapOptions(l: SiteLandscape, which: 'values' | 'blurred', palette: TonePalette, maxWm2?: number): EChartsCoreOption {
  const g = l.grid!;
  const nA = g.azimuthsDeg.length;
  const values = g[which];
  const data: [number, number, number][] = new Array(values.length);
  let max = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    data[i] = [i % nA, Math.floor(i / nA), v];
    if (v > max) max = v;
  }
  const marks = maximaMarks(l);
  const scatter = (name: string, symbol: string, size: number, colour: string, points: { x: number; y: number; label: string }[]) => ({
    name,
    type: 'scatter',
    symbol,
    symbolSize: size,
    z: 5,
    itemStyle: { color: colour, borderColor: '#000', borderWidth: 1 },
    label: {
      show: true,
      position: 'right',
      color: '#000',
      backgroundColor: 'rgba(255,255,255,0.8)',
      padding: [2, 4],
      borderRadius: 3,
      fontSize: 11,
      formatter: (p: { data: { label: string } }) => p.data.label,
    },
    data: points.map((p) => ({ value: [p.x, p.y], label: p.label })),
  });
  const series: unknown[] = [
    {
      name: which === 'values' ? 'Irradiance' : 'Blurred irradiance',
      type: 'heatmap',
      data,
      progressive: 0,
      emphasis: { disabled: true },
    },
  ];
  if (which === 'values') {
    series.push(
      scatter(
        'Modelled best',
        'pin',
        26,
        palette.good,
        marks
          .filter((m) => m.best)
          .map((m) => ({
            x: cellIndex(g.azimuthsDeg, m.azimuthDeg),
            y: cellIndex(g.tiltsDeg, m.tiltDeg),
            label:
              m.basinShare === null
                ? `best ${Math.round(m.wm2)} W/m² · at the travel limit`
                : `best ${Math.round(m.wm2)} W/m² · basin ${Math.round(m.basinShare * 100)} %`,
          })),
      ),
    );
    series.push(
      scatter(
        'Lesser peak',
        'diamond',
        16,
        palette.caution,
        marks
          .filter((m) => !m.best)
          .map((m) => ({
            x: cellIndex(g.azimuthsDeg, m.azimuthDeg),
            y: cellIndex(g.tiltsDeg, m.tiltDeg),
            label: `${Math.round(m.wm2)} W/m² · basin ${Math.round((m.basinShare ?? 0) * 100)} %`,
          })),
      ),
    );
  }
  if (l.sun && l.sun.elevationDeg > 0) {
    series.push(
      scatter('Facing the sun', 'circle', 14, palette.accent, [
        { x: cellIndex(g.azimuthsDeg, l.sun.azimuthDeg), y: cellIndex(g.tiltsDeg, 90 - l.sun.elevationDeg), label: 'sun' },
      ]),
    );
  }
  return {
    animation: false,
    legend: { top: 0, data: series.slice(1).map((s) => (s as { name: string }).name), textStyle: { color: palette.text } },
    tooltip: {
      formatter: (p: { seriesType: string; data: [number, number, number] | { value: number[]; label: string } }) => {
        if (p.seriesType === 'heatmap') {
          const d = p.data as [number, number, number];
          return `tilt ${g.tiltsDeg[d[1]]}°, azimuth ${g.azimuthsDeg[d[0]]}°<br>${d[2]} W/m²`;
        }
        const d = p.data as { value: number[]; label: string };
        return `${d.label}<br>tilt ${g.tiltsDeg[d.value[1]!]}°, azimuth ${g.azimuthsDeg[d.value[0]!]}°`;
      },
    },
    grid: { left: 64, right: 24, top: 36, bottom: 96 },
    xAxis: {
      type: 'category',
      data: g.azimuthsDeg.map(String),
      name: 'Panel azimuth [°, clockwise from north]',
      nameLocation: 'middle',
      nameGap: 28,
      nameTextStyle: { color: palette.muted },
      axisLabel: {
        color: palette.muted,
        interval: (i: number) => g.azimuthsDeg[i]! % 45 === 0,
        formatter: (v: string) => `${v}°${COMPASS[Number(v)] ? ` ${COMPASS[Number(v)]}` : ''}`,
      },
      splitArea: { show: false },
    },
    yAxis: {
      type: 'category',
      data: g.tiltsDeg.map(String),
      name: 'Panel tilt [°]',
      nameTextStyle: { color: palette.muted },
      axisLabel: { color: palette.muted, interval: (i: number) => g.tiltsDeg[i]! % 15 === 0, formatter: '{value}°' },
    },
    visualMap: {
      type: 'continuous',
      min: 0,
      max: Math.max(1, Math.ceil(maxWm2 ?? max)),
      calculable: false,
      orient: 'horizontal',
      left: 'center',
      bottom: 4,
      itemHeight: 240,
      text: [`${Math.ceil(maxWm2 ?? max)} W/m²`, '0 W/m²'],
      textStyle: { color: palette.text },
      inRange: { color: ['#0b1d3a', '#1f4e79', '#2f8f83', '#a7c957', '#f2e85c', '#fff7d6'] },
    },
    series,
  };
}

/** The smallest single-peak detector tilt per daylight hour (bars) and the number of peaks (line), in site time. */
export function dayOptions(day: LandscapeDay, palette: TonePalette, formatHour: (iso: string) => string): EChartsCoreOption {
  const hours = day.hours.map((h) => formatHour(h.at));
  return {
    animation: false,
    legend: { top: 0, textStyle: { color: palette.text } },
    tooltip: { trigger: 'axis' },
    grid: { left: 64, right: 64, top: 40, bottom: 48 },
    xAxis: {
      type: 'category',
      data: hours,
      name: `hour (site time, ${day.timeZone})`,
      nameLocation: 'middle',
      nameGap: 30,
      nameTextStyle: { color: palette.muted },
      axisLabel: { color: palette.muted },
    },
    yAxis: [
      {
        type: 'value',
        name: 'Detector tilt [°]',
        min: 0,
        axisLabel: { color: palette.muted, formatter: '{value}°' },
        nameTextStyle: { color: palette.muted },
        splitLine: { lineStyle: { color: palette.grid } },
      },
      {
        type: 'value',
        name: 'Peaks',
        min: 0,
        minInterval: 1,
        axisLabel: { color: palette.muted },
        nameTextStyle: { color: palette.muted },
        splitLine: { show: false },
      },
    ],
    series: [
      {
        name: 'Smallest single-peak detector tilt',
        type: 'bar',
        itemStyle: { color: palette.primary },
        data: day.hours.map((h) =>
          h.minSinglePeakDetectorTiltDeg === null
            ? { value: 30, itemStyle: { color: palette.problem, decal: { symbol: 'rect' } } }
            : h.minSinglePeakDetectorTiltDeg,
        ),
        label: {
          show: true,
          position: 'top',
          color: palette.text,
          fontSize: 10,
          formatter: (p: { dataIndex: number }) =>
            day.hours[p.dataIndex]!.minSinglePeakDetectorTiltDeg === null
              ? '> 30°'
              : `${day.hours[p.dataIndex]!.minSinglePeakDetectorTiltDeg}°`,
        },
        ...(day.recommendedDetectorTiltDeg !== null
          ? {
              markLine: {
                symbol: 'none',
                data: [{ yAxis: day.recommendedDetectorTiltDeg, name: 'whole day' }],
                label: { formatter: 'whole day {c}°', color: palette.text },
                lineStyle: { color: palette.good, type: 'dashed' },
              },
            }
          : {}),
      },
      {
        name: 'Peaks',
        type: 'line',
        yAxisIndex: 1,
        symbol: 'diamond',
        symbolSize: 8,
        itemStyle: { color: palette.caution },
        data: day.hours.map((h) => h.peaks),
      },
    ],
  };
}
