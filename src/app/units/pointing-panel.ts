import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { SiteLandscape } from '../../../shared/contracts/landscape';
import type { UnitLiveState } from '../../../shared/contracts/live';
import { readPalette, TONE_SYMBOL, type TonePalette } from '../live/tone-palette';
import type { Tone } from '../live/unit-status';
import { ColourScheme } from '../shell/colour-scheme';
import { normalToDome, skyDomeOptions, type DomePoint } from './sky-dome';

/** Where the unit points on the sky dome, against the sun, the modelled best and the lesser peaks. */
@Component({
  selector: 'bw-pointing-panel',
  imports: [MatIconModule, NgxEchartsDirective],
  template: `
    <section class="panel" aria-labelledby="dome-title">
      <h2 id="dome-title">Where it points</h2>
      <p class="hint">
        Sky dome seen from the site: north up, azimuth clockwise, horizon at the rim, straight up in the centre. The panel marker shows the
        direction its face points.
      </p>
      @if (problem(); as message) {
        <div class="notice problem" role="alert">
          <mat-icon aria-hidden="true">error</mat-icon>
          <p>The modelled sky could not be loaded. {{ message }}</p>
        </div>
      }
      <div
        class="dome-chart"
        echarts
        [options]="options()"
        role="img"
        [attr.aria-label]="'Sky dome: panel, sun, modelled best and ' + ((landscape()?.localMaxima?.length ?? 1) - 1) + ' lesser peaks'"
      ></div>
      @if (landscape(); as l) {
        <p class="hint">
          {{
            l.localMaxima.length === 1 ? 'One peak in the modelled landscape.' : l.localMaxima.length + ' peaks in the modelled landscape.'
          }}
          @if (l.minSinglePeakDetectorTiltDeg !== null && l.localMaxima.length > 1) {
            A detector tilt of {{ l.minSinglePeakDetectorTiltDeg }}° or more would leave only one.
          }
          @if (showModelSource()) {
            Magnitudes: {{ l.magnitudeSource }}.
          }
        </p>
      }
    </section>
  `,
  styleUrl: './unit-panel.scss',
  styles: `
    .dome-chart {
      height: 380px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PointingPanel {
  private readonly scheme = inject(ColourScheme);

  /** The site's modelled landscape now; null until loaded. */
  readonly landscape = input<SiteLandscape | null>(null);
  readonly problem = input<string | null>(null);
  readonly state = input<UnitLiveState | null>(null);
  /** The unit's status tone: the panel marker is hollow when the unit is not reporting. */
  readonly tone = input<Tone>('stopped');
  /** Whether to name the model behind the magnitudes (engineers and admins: permission `readModelDetails`). */
  readonly showModelSource = input(false);

  protected readonly options = computed(() => {
    void this.scheme.current();
    const p = readPalette();
    return skyDomeOptions({ points: domePoints(this.landscape(), this.state(), this.tone(), p) }, p);
  });
}

/** The markers on the dome: lesser peaks, the modelled best, the sun and where the panel points. */
export function domePoints(l: SiteLandscape | null, s: UnitLiveState | null, tone: Tone, p: TonePalette): DomePoint[] {
  const pts: DomePoint[] = [];
  if (l) {
    const others = l.localMaxima.filter((m) => m.tiltDeg !== l.globalMax.tiltDeg || m.azimuthDeg !== l.globalMax.azimuthDeg);
    for (const [i, m] of others.entries()) {
      pts.push({
        name: i === 0 ? 'Lesser peak' : `Lesser peak ${i + 1}`,
        ...normalToDome(m.tiltDeg, m.azimuthDeg),
        symbol: 'diamond',
        size: 14,
        colour: p.caution,
        label: `${Math.round(m.wm2)} W/m² · basin ${Math.round(m.basinShare * 100)} %`,
      });
    }
    const g = l.localMaxima.find((m) => m.tiltDeg === l.globalMax.tiltDeg && m.azimuthDeg === l.globalMax.azimuthDeg);
    pts.push({
      name: 'Modelled best',
      ...normalToDome(l.globalMax.tiltDeg, l.globalMax.azimuthDeg),
      symbol: 'pin',
      size: 24,
      colour: p.good,
      label: `best ${Math.round(l.globalMax.wm2)} W/m²${g ? ` · basin ${Math.round(g.basinShare * 100)} %` : ''}`,
    });
    if (l.sun)
      pts.push({
        name: 'Sun',
        azimuthDeg: l.sun.azimuthDeg,
        elevationDeg: l.sun.elevationDeg,
        symbol: 'circle',
        size: 20,
        colour: p.accent,
        label: 'sun',
      });
  }
  if (s?.tiltDeg !== null && s?.tiltDeg !== undefined && s.azimuthDeg !== null) {
    pts.push({
      name: 'Panel points here',
      ...normalToDome(s.tiltDeg, s.azimuthDeg),
      symbol: TONE_SYMBOL[tone] === 'emptyCircle' ? 'emptyCircle' : 'triangle',
      size: 18,
      colour: p.primary,
      label: s.serial,
    });
  }
  return pts;
}
