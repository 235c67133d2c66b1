import type { EChartsCoreOption } from 'echarts/core';
import type { ScanResult } from '../../../shared/contracts/alarms';
import type { TonePalette } from '../live/tone-palette';

const r1 = (x: number) => Math.round(x * 10) / 10;

/** Index of the raster value nearest an angle. */
function nearest(values: readonly number[], v: number): number {
  let best = 0;
  for (let i = 1; i < values.length; i++) if (Math.abs(values[i]! - v) < Math.abs(values[best]! - v)) best = i;
  return best;
}

/** Below this the model's best is too dim to compare with (night) [W/m²]. */
const MODEL_MIN_WM2 = 50;

function usableModel(scan: ScanResult): ScanResult['model'] {
  return scan.model && scan.model.globalMax.wm2 >= MODEL_MIN_WM2 ? scan.model : null;
}

/** The heat map cells of a scan: [azimuth index, tilt index, W/m²], cells without a sample left out. */
export function scanCells(scan: ScanResult): [number, number, number][] {
  const cells: [number, number, number][] = [];
  scan.landscape.values.forEach((row, i) => row.forEach((v, j) => v !== null && cells.push([j, i, Math.round(v)])));
  return cells;
}

/** What a scan says, in sentences for the page (numbers rounded). */
export function scanFindings(scan: ScanResult): { measuredBest: string; comparison: string | null; gain: string; worthMoving: boolean } {
  const g = scan.landscape.globalMax;
  const peaks = scan.landscape.localMaxima.length;
  const measuredBest = `Brightest measured: ${Math.round(g.wm2)} W/m² at tilt ${r1(g.tiltDeg)}°, azimuth ${r1(g.azimuthDeg)}° (${scan.landscape.samples} samples, ${peaks} ${peaks === 1 ? 'peak' : 'peaks'}).`;
  const m = usableModel(scan);
  const comparison =
    scan.model && !m
      ? 'The model expects almost no light at this time (night, or lamps off), so there is nothing to compare with.'
      : m
        ? `The model's brightest orientation (${Math.round(m.globalMax.wm2)} W/m² at tilt ${r1(m.globalMax.tiltDeg)}°, azimuth ${r1(m.globalMax.azimuthDeg)}°) is ${r1(m.angleApartDeg)}° from the measured one; measured is ${r1(m.measuredVsModelPct)} % of modelled.`
        : null;
  const gainWm2 = scan.expectedGainWm2;
  const gain =
    gainWm2 === null
      ? 'Expected gain unknown: no reading from before the scan.'
      : gainWm2 > 0
        ? `Expected gain: +${Math.round(gainWm2)} W/m²${scan.expectedGainPct !== null ? ` (+${r1(scan.expectedGainPct)} %)` : ''} over the ${Math.round(scan.beforeWm2 ?? 0)} W/m² it had before the scan.`
        : `No gain expected: it already had ${Math.round(scan.beforeWm2 ?? 0)} W/m² before the scan.`;
  return { measuredBest, comparison, gain, worthMoving: (gainWm2 ?? 1) > 0 };
}

/** Heat map of a scan over azimuth × tilt, with the measured best (pin), lesser peaks (diamonds) and the model's best (circle). */
export function scanHeatmapOptions(scan: ScanResult, palette: TonePalette): EChartsCoreOption {
  const l = scan.landscape;
  const cells = scanCells(scan);
  const max = Math.max(1, ...cells.map((c) => c[2]));
  const mark = (
    name: string,
    symbol: string,
    size: number,
    colour: string,
    pts: { tiltDeg: number; azimuthDeg: number; label: string }[],
  ) => ({
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
      backgroundColor: 'rgba(255,255,255,0.85)',
      padding: [2, 4],
      borderRadius: 3,
      fontSize: 11,
      formatter: (p: { data: { label: string } }) => p.data.label,
    },
    data: pts.map((p) => ({ value: [nearest(l.azimuthsDeg, p.azimuthDeg), nearest(l.tiltsDeg, p.tiltDeg)], label: p.label })),
  });
  const series: unknown[] = [{ name: 'Measured', type: 'heatmap', data: cells, progressive: 0, emphasis: { disabled: true } }];
  series.push(mark('Brightest measured', 'pin', 26, palette.good, [{ ...l.globalMax, label: `best ${Math.round(l.globalMax.wm2)} W/m²` }]));
  const lesser = l.localMaxima.filter(
    (m) =>
      nearest(l.tiltsDeg, m.tiltDeg) !== nearest(l.tiltsDeg, l.globalMax.tiltDeg) ||
      nearest(l.azimuthsDeg, m.azimuthDeg) !== nearest(l.azimuthsDeg, l.globalMax.azimuthDeg),
  );
  if (lesser.length)
    series.push(
      mark(
        'Lesser peak',
        'diamond',
        16,
        palette.caution,
        lesser.map((m) => ({ ...m, label: `${Math.round(m.wm2)} W/m²` })),
      ),
    );
  const model = usableModel(scan);
  if (model) series.push(mark('Modelled best', 'circle', 14, palette.accent, [{ ...model.globalMax, label: 'model' }]));
  return {
    animation: false,
    legend: { top: 0, data: series.slice(1).map((s) => (s as { name: string }).name), textStyle: { color: palette.text } },
    tooltip: {
      formatter: (p: { seriesType: string; data: [number, number, number] | { value: number[]; label: string } }) => {
        if (p.seriesType === 'heatmap') {
          const d = p.data as [number, number, number];
          return `tilt ${l.tiltsDeg[d[1]]}°, azimuth ${l.azimuthsDeg[d[0]]}°<br>${d[2]} W/m²`;
        }
        const d = p.data as { value: number[]; label: string };
        return `${d.label}<br>tilt ${l.tiltsDeg[d.value[1]!]}°, azimuth ${l.azimuthsDeg[d.value[0]!]}°`;
      },
    },
    grid: { left: 56, right: 16, top: 36, bottom: 90 },
    xAxis: {
      type: 'category',
      data: l.azimuthsDeg.map(String),
      name: 'Azimuth [°, clockwise from north]',
      nameLocation: 'middle',
      nameGap: 28,
      nameTextStyle: { color: palette.muted },
      axisLabel: { color: palette.muted, formatter: '{value}°' },
    },
    yAxis: {
      type: 'category',
      data: l.tiltsDeg.map(String),
      name: 'Tilt [°]',
      nameTextStyle: { color: palette.muted },
      axisLabel: { color: palette.muted, formatter: '{value}°' },
    },
    visualMap: {
      type: 'continuous',
      min: 0,
      max,
      calculable: false,
      orient: 'horizontal',
      left: 'center',
      bottom: 4,
      itemHeight: 200,
      text: [`${max} W/m²`, '0 W/m²'],
      textStyle: { color: palette.text },
      inRange: { color: ['#0b1d3a', '#1f4e79', '#2f8f83', '#a7c957', '#f2e85c', '#fff7d6'] },
    },
    series,
  };
}
