import type { EChartsCoreOption } from 'echarts/core';
import { TONE_WORDS, type Tone } from '../live/unit-status';
import { TONE_SYMBOL, type TonePalette } from '../live/tone-palette';
import type { FleetRow } from './fleet-rows';

const TONE_ORDER: Tone[] = ['problem', 'caution', 'busy', 'good', 'stopped'];

/** Scatter plot of a site's units at their plan positions [m], one series per tone (shape + colour + legend word). */
export function sitePlanOptions(rows: readonly FleetRow[], palette: TonePalette): EChartsCoreOption {
  const series = TONE_ORDER.map((tone) => ({
    name: TONE_WORDS[tone],
    type: 'scatter',
    symbol: TONE_SYMBOL[tone],
    symbolSize: 18,
    itemStyle: { color: palette[tone] },
    label: {
      show: true,
      position: 'top',
      color: palette.text,
      fontSize: 11,
      formatter: (p: { data: { serial: string } }) => p.data.serial,
    },
    data: rows
      .filter((r) => r.look.tone === tone)
      .map((r) => ({
        value: [r.unit.planXM, r.unit.planYM],
        unitId: r.unit.id,
        serial: r.unit.serial,
        stateLabel: r.alarms.length ? `${r.look.label} · ${r.alarms.length} alarm${r.alarms.length > 1 ? 's' : ''}` : r.look.label,
        poa: r.live?.poaWm2 ?? null,
        power: r.live?.dcPowerW ?? null,
      })),
  }));
  const xs = rows.map((r) => r.unit.planXM);
  const ys = rows.map((r) => r.unit.planYM);
  const pad = 4;
  const axis = (name: string, values: number[]) => ({
    type: 'value',
    name,
    nameLocation: 'middle',
    nameGap: 28,
    min: Math.floor(Math.min(0, ...values) - pad),
    max: Math.ceil(Math.max(0, ...values) + pad),
    minInterval: 1,
    axisLabel: { color: palette.muted, formatter: '{value} m' },
    nameTextStyle: { color: palette.muted },
    splitLine: { lineStyle: { color: palette.grid } },
  });
  return {
    animation: false,
    grid: { left: 56, right: 24, top: 40, bottom: 48 },
    legend: { top: 0, textStyle: { color: palette.text }, data: TONE_ORDER.map((t) => ({ name: TONE_WORDS[t], icon: TONE_SYMBOL[t] })) },
    tooltip: {
      trigger: 'item',
      formatter: (p: { data: { serial: string; stateLabel: string; poa: number | null; power: number | null; value: number[] } }) =>
        `<b>${p.data.serial}</b><br>${p.data.stateLabel}<br>In-plane ${p.data.poa === null ? '—' : Math.round(p.data.poa) + ' W/m²'}` +
        `<br>DC power ${p.data.power === null ? '—' : Math.round(p.data.power) + ' W'}<br>Position ${p.data.value[0]} m E, ${p.data.value[1]} m N`,
    },
    xAxis: axis('East of site origin [m]', xs),
    yAxis: axis('North of site origin [m]', ys),
    series,
  };
}
