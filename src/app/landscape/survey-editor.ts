import { ChangeDetectionStrategy, Component, computed, effect, inject, input, output, signal, untracked } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { Site } from '../../../shared/contracts/api';
import { surveyFieldWords } from '../../../shared/contracts/plain-words';
import type { SiteSurvey, SurveyReflector } from '../../../shared/contracts/survey';
import { LandscapeApi } from '../core/landscape-api';
import { readPalette } from '../live/tone-palette';
import { ColourScheme } from '../shell/colour-scheme';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';
import { skyDomeOptions } from '../units/sky-dome';
import { parseHorizonCsv, type CsvProblem } from './horizon-csv';

/** One survey problem for people: the field as the form names it, then what is wrong ("Facade 1, reflectance: must be …"). */
export function surveyProblemText(path: string, message: string): string {
  return `${surveyFieldWords(path)}: ${message}`;
}

/** Problems a survey has before it is sent (the server checks again and names fields the same way). */
export function surveyProblems(s: SiteSurvey): Record<string, string> {
  const p: Record<string, string> = {};
  s.horizon.forEach(([az, el], i) => {
    if (!Number.isFinite(az) || az < 0 || az >= 360) p[`horizon.${i}`] = 'Azimuth must be from 0 to under 360°.';
    else if (!Number.isFinite(el) || el < 0 || el > 90) p[`horizon.${i}`] = 'Elevation must be from 0 to 90°.';
    else if (i > 0 && az < s.horizon[i - 1]![0]) p[`horizon.${i}`] = 'Points must be in azimuth order (use Sort).';
  });
  s.reflectors.forEach((r, i) => {
    const bad = (v: number, lo: number, hi: number) => !Number.isFinite(v) || v < lo || v > hi;
    if (bad(r.reflectance, 0, 1)) p[`reflectors.${i}.reflectance`] = 'Reflectance must be from 0 to 1.';
    if (bad(r.normalAzimuthDeg, 0, 360) || bad(r.azimuthFromDeg, 0, 360) || bad(r.azimuthToDeg, 0, 360))
      p[`reflectors.${i}`] = 'Azimuths must be from 0 to 360°.';
    if (bad(r.elevationFromDeg, -90, 90) || bad(r.elevationToDeg, -90, 90) || bad(r.normalElevationDeg, -90, 90))
      p[`reflectors.${i}`] = 'Elevations must be from −90 to 90°.';
  });
  return p;
}

const NEW_REFLECTOR: SurveyReflector = {
  normalAzimuthDeg: 90,
  normalElevationDeg: 0,
  azimuthFromDeg: 240,
  azimuthToDeg: 300,
  elevationFromDeg: 0,
  elevationToDeg: 30,
  reflectance: 0.3,
};

/** The site survey: horizon profile and reflecting facades, with a sky-dome preview and a CSV import of the horizon. */
@Component({
  selector: 'bw-survey-editor',
  imports: [
    FormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    NgxEchartsDirective,
  ],
  templateUrl: './survey-editor.html',
  styleUrl: './survey-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SurveyEditor {
  private readonly api = inject(LandscapeApi);
  private readonly notify = inject(Notify);
  private readonly scheme = inject(ColourScheme);

  readonly site = input.required<Site>();
  readonly sunPath = input<readonly { azimuthDeg: number; elevationDeg: number }[]>([]);
  readonly saved = output<SiteSurvey>();

  protected readonly survey = signal<SiteSurvey | null>(null);
  protected readonly original = signal<string>('');
  protected readonly loading = signal(false);
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly serverFields = signal<Record<string, string>>({});
  protected readonly csvProblems = signal<CsvProblem[]>([]);
  protected readonly csvName = signal<string | null>(null);

  protected readonly dirty = computed(() => this.survey() !== null && JSON.stringify(this.survey()) !== this.original());
  protected readonly problems = computed(() => (this.survey() ? surveyProblems(this.survey()!) : {}));
  /** Every problem, named as the form names the field ("Horizon point 4", "Facade 1, reflectance"), counted from 1. */
  protected readonly problemList = computed(() =>
    Object.entries({ ...this.problems(), ...this.serverFields() }).map(([path, message]) => ({
      path,
      text: surveyProblemText(path, message),
    })),
  );
  protected readonly preview = computed(() => {
    void this.scheme.current();
    const s = this.survey();
    const p = readPalette();
    return skyDomeOptions({ points: [], horizon: s?.horizon ?? [], reflectors: s?.reflectors ?? [], sunPath: this.sunPath() }, p);
  });
  protected readonly skyTypes: { value: SiteSurvey['skyType']; label: string }[] = [
    { value: 'isotropic', label: 'Even sky (isotropic)' },
    { value: 'moon-spencer', label: 'Overcast (Moon–Spencer)' },
    ...Array.from({ length: 15 }, (_, i) => ({ value: i + 1, label: `CIE general sky type ${i + 1}` })),
  ];

  constructor() {
    effect(() => {
      const id = this.site().id;
      untracked(() => this.load(id));
    });
  }

  protected load(siteId: number): void {
    this.loading.set(true);
    this.problem.set(null);
    this.api.survey(siteId).subscribe({
      next: (s) => {
        this.survey.set(structuredClone(s));
        this.original.set(JSON.stringify(s));
        this.loading.set(false);
      },
      error: (e: unknown) => {
        this.problem.set(toApiProblem(e).message);
        this.loading.set(false);
      },
    });
  }

  private edit(change: (s: SiteSurvey) => void): void {
    const s = structuredClone(this.survey()!);
    change(s);
    this.survey.set(s);
    this.serverFields.set({});
  }

  protected setSkyType(v: SiteSurvey['skyType']): void {
    this.edit((s) => (s.skyType = v));
  }
  protected setPoint(i: number, k: 0 | 1, v: number): void {
    this.edit((s) => (s.horizon[i]![k] = Number(v)));
  }
  protected addPoint(): void {
    this.edit((s) => s.horizon.push([s.horizon.length ? Math.min(359, s.horizon.at(-1)![0] + 10) : 0, 0]));
  }
  protected removePoint(i: number): void {
    this.edit((s) => s.horizon.splice(i, 1));
  }
  protected sortPoints(): void {
    this.edit((s) => s.horizon.sort((a, b) => a[0] - b[0]));
  }
  protected setReflector(i: number, key: keyof SurveyReflector, v: number): void {
    this.edit((s) => (s.reflectors[i]![key] = Number(v)));
  }
  protected addReflector(): void {
    this.edit((s) => s.reflectors.push({ ...NEW_REFLECTOR }));
  }
  protected removeReflector(i: number): void {
    this.edit((s) => s.reflectors.splice(i, 1));
  }
  protected revert(): void {
    this.survey.set(JSON.parse(this.original()) as SiteSurvey);
    this.csvProblems.set([]);
    this.serverFields.set({});
  }

  /** Reads an uploaded horizon CSV; replaces the horizon only when every line is good (saving is still a separate step). */
  protected async importCsv(event: Event): Promise<void> {
    const inputEl = event.target as HTMLInputElement;
    const file = inputEl.files?.[0];
    inputEl.value = '';
    if (!file) return;
    this.csvName.set(file.name);
    const result = parseHorizonCsv(await file.text());
    if (!result.ok) {
      this.csvProblems.set(result.problems);
      return;
    }
    this.csvProblems.set([]);
    this.edit((s) => (s.horizon = result.points));
    this.notify.done(`${result.points.length} horizon points read from ${file.name}. Check the preview, then save.`);
  }

  protected save(): void {
    const s = this.survey();
    if (!s || Object.keys(this.problems()).length) return;
    this.saving.set(true);
    this.api.saveSurvey(this.site().id, s).subscribe({
      next: (saved) => {
        this.saving.set(false);
        this.survey.set(structuredClone(saved));
        this.original.set(JSON.stringify(saved));
        this.notify.done(`Survey of ${this.site().name} saved.`);
        this.saved.emit(saved);
      },
      error: (e: unknown) => {
        this.saving.set(false);
        const p = toApiProblem(e);
        this.serverFields.set(p.fields);
        this.notify.problem(`The survey was not saved. ${p.message}`);
      },
    });
  }

  protected trackIndex = (i: number) => i;
}
