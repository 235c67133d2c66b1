import type { EChartsCoreOption } from 'echarts/core';
import type { UnitLiveState } from '../../../shared/contracts/live';
import type { TelemetryRowView } from '../core/telemetry-api';
import type { TonePalette } from '../live/tone-palette';
import { siteTime, utcTime } from '../live/unit-status';

export interface HourPoint {
  t: number;
  poa: number | null;
  power: number | null;
  tilt: number | null;
  cmdTilt: number | null;
  azimuth: number | null;
  cmdAzimuth: number | null;
}

const HOUR_MS = 3_600_000;

export function pointFromRow(r: TelemetryRowView): HourPoint {
  return {
    t: Date.parse(r.ts),
    poa: r.poa_wm2,
    power: r.dc_power_w,
    tilt: r.tilt_deg,
    cmdTilt: r.cmd_tilt_deg,
    azimuth: r.azimuth_deg,
    cmdAzimuth: r.cmd_azimuth_deg,
  };
}

/** Adds a live state as a point when it is a newer report, and drops points older than an hour before it. */
export function appendLive(points: readonly HourPoint[], s: UnitLiveState): HourPoint[] {
  if (!s.lastReportAt) return [...points];
  const t = Date.parse(s.lastReportAt);
  const last = points.at(-1);
  if (last && t <= last.t) return [...points];
  const next = [
    ...points,
    { t, poa: s.poaWm2, power: s.dcPowerW, tilt: s.tiltDeg, cmdTilt: s.cmdTiltDeg, azimuth: s.azimuthDeg, cmdAzimuth: s.cmdAzimuthDeg },
  ];
  return next.filter((p) => p.t > t - HOUR_MS);
}

/** Two stacked charts over the last hour: in-plane irradiance with output, and measured vs commanded angles. */
export function lastHourOptions(
  points: readonly HourPoint[],
  palette: TonePalette,
  timeZone: string,
  nowMs = Date.now(),
): EChartsCoreOption {
  const axisTime = (i: number) => ({
    type: 'time',
    gridIndex: i,
    min: nowMs - HOUR_MS,
    max: nowMs,
    axisLabel: { color: palette.muted, formatter: (v: number) => siteTime(v, timeZone).slice(0, 5), hideOverlap: true },
    splitLine: { show: false },
    name: i === 1 ? `site time (${timeZone})` : '',
    nameLocation: 'middle',
    nameGap: 26,
    nameTextStyle: { color: palette.muted },
  });
  const axisValue = (i: number, name: string, unit: string, extra: object = {}) => ({
    type: 'value',
    gridIndex: i,
    name,
    nameTextStyle: { color: palette.muted, align: 'left' },
    axisLabel: { color: palette.muted, formatter: `{value} ${unit}` },
    splitLine: { lineStyle: { color: palette.grid } },
    ...extra,
  });
  const line = (name: string, key: keyof HourPoint, x: number, y: number, colour: string, dashed = false) => ({
    name,
    type: 'line',
    xAxisIndex: x,
    yAxisIndex: y,
    showSymbol: false,
    lineStyle: { color: colour, width: dashed ? 1.5 : 2, type: dashed ? 'dashed' : 'solid' },
    itemStyle: { color: colour },
    data: points.map((p) => [p.t, p[key]]),
  });
  return {
    animation: false,
    legend: { top: 0, textStyle: { color: palette.text }, type: 'scroll' },
    tooltip: {
      trigger: 'axis',
      formatter: (items: { axisValue: number; seriesName: string; value: [number, number | null]; marker: string }[]) => {
        const t = items[0]?.axisValue;
        const unitOf = (n: string) => (n.includes('irradiance') ? 'W/m²' : n.includes('DC power') ? 'W' : '°');
        return (
          `${siteTime(t, timeZone)}<br><span style="opacity:.7">${utcTime(t)}</span><br>` +
          items
            .map(
              (i) =>
                `${i.marker}${i.seriesName}: ${i.value[1] === null ? '—' : `${Math.round(i.value[1] * 10) / 10} ${unitOf(i.seriesName)}`}`,
            )
            .join('<br>')
        );
      },
    },
    axisPointer: { link: [{ xAxisIndex: 'all' }] },
    grid: [
      { left: 64, right: 64, top: 48, height: '30%' },
      { left: 64, right: 64, top: '60%', bottom: 48 },
    ],
    xAxis: [axisTime(0), axisTime(1)],
    yAxis: [
      axisValue(0, 'In-plane irradiance [W/m²]', 'W/m²', { min: 0 }),
      axisValue(0, 'DC power [W]', 'W', { min: 0, splitLine: { show: false }, nameTextStyle: { color: palette.muted, align: 'right' } }),
      axisValue(1, 'Angle [°]', '°'),
    ],
    series: [
      line('In-plane irradiance', 'poa', 0, 0, palette.accent),
      line('DC power', 'power', 0, 1, palette.good),
      line('Tilt measured', 'tilt', 1, 2, palette.primary),
      line('Tilt commanded', 'cmdTilt', 1, 2, palette.primary, true),
      line('Azimuth measured', 'azimuth', 1, 2, palette.caution),
      line('Azimuth commanded', 'cmdAzimuth', 1, 2, palette.caution, true),
    ],
  };
}
