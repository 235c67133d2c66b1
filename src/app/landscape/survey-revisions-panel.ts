import { ChangeDetectionStrategy, Component, computed, effect, inject, input, output, signal, untracked } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { Site } from '../../../shared/contracts/api';
import { may } from '../../../shared/contracts/permissions';
import type { SurveyModelError, SurveyRevision, SurveyRevisionParameter } from '../../../shared/contracts/survey-revisions';
import { Session } from '../auth/session';
import { LandscapeApi } from '../core/landscape-api';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';

/** A value as the survey states it: reflectances and albedo to 0.001, angles to 0.1° (`unit` says which). */
export function formatValue(p: Pick<SurveyRevisionParameter, 'kind' | 'unit'>, x: number): string {
  const digits = p.kind === 'albedo' || p.kind === 'reflectance' || p.kind === 'stationScale' ? 3 : 1;
  return `${x.toFixed(digits)}${p.unit}`;
}

/** "0.251 → 0.369 ± 0.003", or the value alone when nothing changes. */
export function changeText(p: SurveyRevisionParameter): string {
  const before = formatValue(p, p.before);
  if (p.status === 'not-observable' || p.status === 'not-confirmed' || formatValue(p, p.after) === before) return `${before} (unchanged)`;
  const pm = p.uncertainty === null ? '' : ` ± ${formatValue(p, p.uncertainty)}`;
  return `${before} → ${formatValue(p, p.after)}${pm}`;
}

/** What a parameter's status means, in words and with an icon (state is never shown by colour alone). */
export function statusOf(p: SurveyRevisionParameter): { icon: string; text: string } {
  switch (p.status) {
    case 'fitted':
      return { icon: 'check_circle', text: 'Fitted' };
    case 'at-bound':
      return { icon: 'vertical_align_top', text: 'At its bound: the scans want more than the fit allows; re-survey it' };
    case 'not-observable':
      return { icon: 'visibility_off', text: 'Not seen by these scans: stays as surveyed' };
    case 'not-confirmed':
      return { icon: 'help', text: 'Not confirmed by the held-out scans: stays as surveyed' };
  }
}

/** "54.4 → 37.1 W/m², brightest orientation 26.1° → 23.4° off". */
export function errorText(before: SurveyModelError, after: SurveyModelError): string {
  const dir =
    before.globalMaxErrorDeg === null || after.globalMaxErrorDeg === null
      ? ''
      : `; brightest orientation ${before.globalMaxErrorDeg}° → ${after.globalMaxErrorDeg}° off`;
  return `${before.meanAbsWm2} → ${after.meanAbsWm2} W/m²${dir}`;
}

const STATE_WORDS: Record<SurveyRevision['state'], { icon: string; text: string }> = {
  proposed: { icon: 'pending_actions', text: 'Proposed' },
  accepted: { icon: 'task_alt', text: 'Accepted' },
  rejected: { icon: 'block', text: 'Rejected' },
  superseded: { icon: 'history', text: 'Superseded' },
};

/**
 * Proposed survey corrections: fitted on the server to the site's recent scans, shown as surveyed → proposed ± one
 * standard error with the bounds of the fit and the model error before and after, and accepted or rejected with a
 * reason. Nothing changes the survey until someone accepts. Only staff who may see revisions get this panel.
 */
@Component({
  selector: 'bw-survey-revisions-panel',
  imports: [FormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule],
  templateUrl: './survey-revisions-panel.html',
  styleUrl: './survey-revisions-panel.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SurveyRevisionsPanel {
  private readonly api = inject(LandscapeApi);
  private readonly notify = inject(Notify);
  private readonly session = inject(Session);

  readonly site = input.required<Site>();
  /** A revision was accepted: the survey changed. */
  readonly accepted = output<SurveyRevision>();

  protected readonly canRead = computed(() => may(this.session.role(), 'readSurveyRevisions'));
  protected readonly canDecide = computed(() => may(this.session.role(), 'editSurvey'));
  protected readonly revisions = signal<SurveyRevision[] | null>(null);
  protected readonly loading = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly proposing = signal(false);
  protected readonly proposeProblem = signal<string | null>(null);
  protected readonly deciding = signal(false);
  protected readonly reason = signal('');
  protected readonly reasonProblem = signal<string | null>(null);

  /** The open proposal, if any (at most one per site). */
  protected readonly open = computed(() => this.revisions()?.find((r) => r.state === 'proposed') ?? null);
  protected readonly history = computed(() => (this.revisions() ?? []).filter((r) => r.state !== 'proposed'));
  protected readonly stationScale = computed(() => this.open()?.parameters.find((p) => p.kind === 'stationScale') ?? null);
  protected readonly surveyParameters = computed(() => this.open()?.parameters.filter((p) => p.kind !== 'stationScale') ?? []);
  /** Every survey quantity stays as surveyed (none fitted, or none confirmed): accepting would change nothing. */
  protected readonly nothingChanges = computed(() =>
    this.surveyParameters().every((p) => p.status === 'not-observable' || p.status === 'not-confirmed' || p.after === p.before),
  );
  protected readonly stateWords = STATE_WORDS;
  protected readonly changeText = changeText;
  protected readonly statusOf = statusOf;
  protected readonly errorText = errorText;
  protected readonly formatValue = formatValue;

  constructor() {
    effect(() => {
      const id = this.site().id;
      if (untracked(this.canRead)) untracked(() => this.load(id));
    });
  }

  protected load(siteId = this.site().id): void {
    this.loading.set(true);
    this.problem.set(null);
    this.api.surveyRevisions(siteId).subscribe({
      next: (list) => {
        this.revisions.set(list);
        this.loading.set(false);
      },
      error: (e: unknown) => {
        this.problem.set(toApiProblem(e).message);
        this.loading.set(false);
      },
    });
  }

  protected propose(): void {
    const siteId = this.site().id;
    this.proposing.set(true);
    this.proposeProblem.set(null);
    this.api.proposeSurveyRevision(siteId).subscribe({
      next: () => {
        this.proposing.set(false);
        this.reason.set('');
        this.load(siteId);
      },
      error: (e: unknown) => {
        this.proposing.set(false);
        this.proposeProblem.set(toApiProblem(e).message);
      },
    });
  }

  protected decide(decision: 'accept' | 'reject'): void {
    const r = this.open();
    if (!r) return;
    const reason = this.reason().trim();
    if (reason.length < 3) {
      this.reasonProblem.set(`Say why you ${decision} it (at least 3 characters).`);
      return;
    }
    this.reasonProblem.set(null);
    this.deciding.set(true);
    this.api.decideSurveyRevision(r.siteId, r.id, decision, reason).subscribe({
      next: (done) => {
        this.deciding.set(false);
        this.reason.set('');
        if (decision === 'accept') {
          const cleared = done.outcome?.trapAlarmsCleared ?? 0;
          this.notify.done(
            `Revision ${done.version} is now the survey of ${this.site().name}.` +
              (cleared ? ` ${cleared} trap alarm${cleared === 1 ? '' : 's'} the revised model does not see cleared.` : ''),
          );
          this.accepted.emit(done);
        } else this.notify.done(`Revision ${done.version} rejected; the survey is unchanged.`);
        this.load(r.siteId);
      },
      error: (e: unknown) => {
        this.deciding.set(false);
        this.notify.problem(toApiProblem(e).message);
        this.load(r.siteId);
      },
    });
  }
}
