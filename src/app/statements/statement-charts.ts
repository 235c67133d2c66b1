import type { EChartsCoreOption } from 'echarts/core';
import type { StatementDay, StatementTrendMonth } from '../../../shared/contracts/statements';
import type { TonePalette } from '../live/tone-palette';

const axisText = (p: TonePalette) => ({ color: p.muted });

/** Energy bars (kWh DC) with the PR line on a second axis; `labels` are days or months. */
function energyAndPr(labels: string[], energy: (number | null)[], pr: (number | null)[], p: TonePalette, what: string): EChartsCoreOption {
  return {
    aria: { enabled: true, label: { description: `${what}: energy in kWh as bars, performance ratio as a line.` } },
    grid: { left: 56, right: 48, top: 36, bottom: 40 },
    legend: { top: 0, textStyle: { color: p.text } },
    tooltip: { trigger: 'axis' },
    xAxis: { type: 'category', data: labels, axisLabel: { ...axisText(p), hideOverlap: true } },
    yAxis: [
      { type: 'value', name: 'kWh (DC)', nameTextStyle: axisText(p), axisLabel: axisText(p), splitLine: { lineStyle: { color: p.grid } } },
      { type: 'value', name: 'PR', min: 0, max: 1.2, nameTextStyle: axisText(p), axisLabel: axisText(p), splitLine: { show: false } },
    ],
    series: [
      { name: 'Energy (kWh)', type: 'bar', data: energy, itemStyle: { color: p.primary } },
      {
        name: 'PR',
        type: 'line',
        yAxisIndex: 1,
        data: pr,
        symbol: 'diamond',
        symbolSize: 7,
        connectNulls: false,
        itemStyle: { color: p.accent },
      },
    ],
  };
}

/** The statement page's daily chart. */
export function dailyChart(days: readonly StatementDay[], p: TonePalette): EChartsCoreOption {
  return energyAndPr(
    days.map((d) => d.date.slice(8)),
    days.map((d) => d.energyKwh),
    days.map((d) => d.pr),
    p,
    'Each day of the month',
  );
}

/** The portfolio's twelve months and this one: energy bars, PR line. */
export function trendChart(months: readonly StatementTrendMonth[], p: TonePalette): EChartsCoreOption {
  return energyAndPr(
    months.map((m) => (m.partial ? `${m.month} (so far)` : m.month)),
    months.map((m) => (m.hasData ? m.energyKwh : null)),
    months.map((m) => m.pr),
    p,
    'The last twelve months and this month so far',
  );
}

/** Availability and gains per month as lines (percent). */
export function trendRatesChart(months: readonly StatementTrendMonth[], p: TonePalette): EChartsCoreOption {
  const pct = (x: number | null) => (x === null ? null : Math.round(x * 1000) / 10);
  return {
    aria: {
      enabled: true,
      label: { description: 'Availability and gain over fixed-tilt and sun-following mounts per month, in percent.' },
    },
    grid: { left: 56, right: 24, top: 36, bottom: 40 },
    legend: { top: 0, textStyle: { color: p.text } },
    tooltip: { trigger: 'axis' },
    xAxis: { type: 'category', data: months.map((m) => m.month), axisLabel: { ...axisText(p), hideOverlap: true } },
    yAxis: { type: 'value', name: '%', nameTextStyle: axisText(p), axisLabel: axisText(p), splitLine: { lineStyle: { color: p.grid } } },
    series: [
      {
        name: 'Availability, contractual (%)',
        type: 'line',
        data: months.map((m) => pct(m.availabilityTimeContractual)),
        symbol: 'circle',
        itemStyle: { color: p.good },
      },
      {
        name: 'Gain over fixed tilt (%)',
        type: 'line',
        data: months.map((m) => m.gainOverFixedPct),
        symbol: 'triangle',
        itemStyle: { color: p.primary },
      },
      {
        name: 'Gain over sun-following (%)',
        type: 'line',
        data: months.map((m) => m.gainOverSunPct),
        symbol: 'rect',
        itemStyle: { color: p.accent },
      },
    ],
  };
}
