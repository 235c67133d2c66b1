import type { EChartsCoreOption } from 'echarts/core';
import { TRACE_QUANTITY_INFO, type TraceQuantity, type UnitTraces } from '../../../shared/contracts/traces';
import type { TonePalette } from '../live/tone-palette';
import { siteTime, utcTime } from '../live/unit-status';

/**
 * Min/max envelope as one polyline: each bucket contributes its minimum and its maximum (in the order that keeps the
 * line short), so spikes that a mean would hide stay visible. Gaps (missing buckets) break the line.
 */
export function envelope(
  t: readonly number[],
  min: readonly (number | null)[],
  max: readonly (number | null)[],
  bucketMs: number,
): [number, number | null][] {
  const out: [number, number | null][] = [];
  let last: number | null = null;
  for (let i = 0; i < t.length; i++) {
    if (i > 0 && t[i]! - t[i - 1]! > bucketMs * 1.5) out.push([t[i - 1]! + bucketMs, null]); // gap
    const lo = min[i] ?? null;
    const hi = max[i] ?? null;
    if (lo === null || hi === null) {
      out.push([t[i]!, null]);
      last = null;
      continue;
    }
    const firstLow: boolean = last === null || Math.abs(last - lo) <= Math.abs(last - hi);
    const a = firstLow ? lo : hi;
    const b: number = firstLow ? hi : lo;
    out.push([t[i]!, a]);
    if (hi !== lo) out.push([t[i]! + bucketMs / 2, b]);
    last = b;
  }
  return out;
}

/** The five stacked panels of the explorer and the quantities each draws. */
export const PANELS: { title: string; unit: string; quantities: TraceQuantity[]; best?: boolean }[] = [
  { title: 'Detector readings', unit: 'W/m²', quantities: ['tiltPlusWm2', 'tiltMinusWm2', 'azimuthPlusWm2', 'azimuthMinusWm2'] },
  { title: 'Photodifferentials', unit: 'W/m²', quantities: ['tiltDiffWm2', 'azimuthDiffWm2'] },
  { title: 'Angles, measured and commanded', unit: '°', quantities: ['tiltDeg', 'cmdTiltDeg', 'azimuthDeg', 'cmdAzimuthDeg'] },
  { title: 'In-plane irradiance and modelled best', unit: 'W/m²', quantities: ['poaWm2'], best: true },
  { title: 'DC power', unit: 'W', quantities: ['dcPowerW'] },
];

const DASHED = new Set<TraceQuantity>(['tiltMinusWm2', 'azimuthMinusWm2', 'cmdTiltDeg', 'cmdAzimuthDeg']);

export interface TraceWindow {
  fromMs: number;
  toMs: number;
}

/** One ECharts option with a grid per panel, every x axis linked and zoomed together. */
export function traceChartOptions(
  all: readonly UnitTraces[],
  palette: TonePalette,
  timeZone: string,
  window: TraceWindow,
): EChartsCoreOption {
  const n = PANELS.length;
  const colours = [palette.primary, palette.accent, palette.good, palette.caution, palette.problem, palette.muted];
  const unitColour = new Map(all.map((u, i) => [u.unitId, i]));
  // Panels share the height between the legend (top 6 %) and the zoom slider (bottom 9 %).
  const h = (100 - 6 - 9) / n;
  const grid = PANELS.map((_, i) => ({ left: 72, right: 24, top: `${6 + i * h + 2.5}%`, height: `${h - 4.5}%` }));
  const xAxis = PANELS.map((_, i) => ({
    type: 'time',
    gridIndex: i,
    min: window.fromMs,
    max: window.toMs,
    axisLabel: {
      show: i === n - 1,
      color: palette.muted,
      hideOverlap: true,
      formatter: (v: number) => shortLocal(v, timeZone, window.toMs - window.fromMs),
    },
    axisTick: { show: i === n - 1 },
    splitLine: { show: false },
    name: i === n - 1 ? `site time (${timeZone})` : '',
    nameLocation: 'middle',
    nameGap: 26,
    nameTextStyle: { color: palette.muted },
  }));
  const yAxis = PANELS.map((p, i) => ({
    type: 'value',
    gridIndex: i,
    scale: true,
    name: `${p.title} [${p.unit}]`,
    nameLocation: 'end',
    nameGap: 8,
    nameTextStyle: { color: palette.text, align: 'left', fontWeight: 500 },
    axisLabel: { color: palette.muted, formatter: `{value} ${p.unit}` },
    splitLine: { lineStyle: { color: palette.grid } },
  }));
  const series: Record<string, unknown>[] = [];
  PANELS.forEach((p, gi) => {
    for (const u of all) {
      const colour = colours[(unitColour.get(u.unitId) ?? 0) % colours.length]!;
      p.quantities.forEach((q, qi) => {
        series.push({
          name: all.length > 1 ? `${u.serial} ${TRACE_QUANTITY_INFO[q].label}` : TRACE_QUANTITY_INFO[q].label,
          type: 'line',
          xAxisIndex: gi,
          yAxisIndex: gi,
          showSymbol: false,
          connectNulls: false,
          sampling: undefined,
          lineStyle: {
            width: 1.2,
            color: p.quantities.length > 1 && all.length === 1 ? colours[qi % colours.length] : colour,
            type: DASHED.has(q) ? 'dashed' : 'solid',
          },
          itemStyle: { color: p.quantities.length > 1 && all.length === 1 ? colours[qi % colours.length] : colour },
          data: envelope(u.t, u.series[q].min, u.series[q].max, u.bucketMs),
          ...(qi === 0 ? { markLine: marks(u, palette, gi === 0) } : {}),
          unitLabel: p.unit,
        });
      });
      if (p.best && u.modelledBest.t.length) {
        series.push({
          name: all.length > 1 ? `${u.serial} modelled best` : 'Modelled best',
          type: 'line',
          xAxisIndex: gi,
          yAxisIndex: gi,
          showSymbol: false,
          lineStyle: { width: 2, color: palette.good, type: 'dotted' },
          itemStyle: { color: palette.good },
          data: u.modelledBest.t.map((t, i) => [t, u.modelledBest.wm2[i]]),
          unitLabel: p.unit,
        });
      }
    }
  });
  return {
    animation: false,
    legend: { top: 0, type: 'scroll', textStyle: { color: palette.text } },
    tooltip: {
      trigger: 'axis',
      axisPointer: { type: 'line' },
      formatter: (
        items: { axisValue: number; seriesName: string; value: [number, number | null]; marker: string; seriesIndex: number }[],
      ) => {
        const t = items[0]?.axisValue;
        return (
          `${siteTime(t, timeZone, true)}<br><span style="opacity:.7">${utcTime(t)}</span><br>` +
          items
            .filter((i) => i.value[1] !== null)
            .map((i) => `${i.marker}${i.seriesName}: ${round(i.value[1]!)} ${unitOfSeries(i.seriesName)}`)
            .join('<br>')
        );
      },
    },
    axisPointer: { link: [{ xAxisIndex: 'all' }] },
    grid,
    xAxis,
    yAxis,
    dataZoom: [
      { type: 'inside', xAxisIndex: PANELS.map((_, i) => i), filterMode: 'none', start: 0, end: 100 },
      {
        type: 'slider',
        xAxisIndex: PANELS.map((_, i) => i),
        bottom: 8,
        height: 22,
        filterMode: 'none',
        start: 0,
        end: 100,
        labelFormatter: (v: number) => shortLocal(v, timeZone, window.toMs - window.fromMs),
      },
    ],
    series,
  };
}

function unitOfSeries(name: string): string {
  for (const info of Object.values(TRACE_QUANTITY_INFO)) if (name.endsWith(info.label)) return info.unit;
  return name.endsWith('modelled best') || name === 'Modelled best' ? 'W/m²' : '';
}

const round = (x: number) => Math.round(x * 10) / 10;

function marks(u: UnitTraces, palette: TonePalette, withLabels: boolean) {
  const data = [
    ...u.events.map((e) => ({ xAxis: Date.parse(e.at), name: e.text, lineStyle: { color: palette.primary, type: 'dashed' } })),
    ...(u.alarms ?? []).map((a) => ({
      xAxis: Date.parse(a.at),
      name: `Alarm: ${a.text}`,
      lineStyle: { color: palette.problem, type: 'solid', width: 2 },
    })),
  ];
  return {
    symbol: ['none', 'none'],
    silent: false,
    label: { show: withLabels && data.length <= 8, formatter: '{b}', position: 'insideEndTop', color: palette.text, fontSize: 10 },
    tooltip: { show: true, formatter: '{b}' },
    data,
  };
}

/** Axis label in site time: HH:MM for short ranges, day and hour for long ones. */
export function shortLocal(ms: number, timeZone: string, spanMs: number): string {
  const f = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    ...(spanMs > 36 * 3_600_000 ? { day: 'numeric', month: 'short' } : {}),
    ...(spanMs <= 20 * 86_400_000 ? { hour: '2-digit', minute: '2-digit', hour12: false } : {}),
  });
  return f.format(ms);
}

/** UTC instant of local midnight of a date in a zone (DST-safe: corrects by the zone's offset at that instant). */
export function zonedMidnightUtc(date: string, timeZone: string): number {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  let guess = Date.UTC(y, m - 1, d);
  for (let i = 0; i < 2; i++) guess = Date.UTC(y, m - 1, d) - offsetMs(guess, timeZone);
  return guess;
}

function offsetMs(atMs: number, timeZone: string): number {
  const parts = new Intl.DateTimeFormat('en-US', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
  })
    .formatToParts(atMs)
    .reduce<Record<string, number>>((acc, p) => (p.type === 'literal' ? acc : { ...acc, [p.type]: Number(p.value) }), {});
  const asUtc = Date.UTC(parts['year']!, parts['month']! - 1, parts['day']!, parts['hour']!, parts['minute']!, parts['second']!);
  return asUtc - Math.floor(atMs / 1000) * 1000;
}

/** Today's date in a zone, YYYY-MM-DD. */
export function localDateOf(ms: number, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(ms);
}
