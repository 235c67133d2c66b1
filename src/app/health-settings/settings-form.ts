import { ChangeDetectionStrategy, Component, computed, input, linkedSignal, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { HEALTH_SETTINGS_REASON_MAX, type SiteHealthSettings } from '../../../shared/contracts/alarms';
import { overridesOf, rangeText, sameOverrides, settingRows, valueProblem, valueText, type SettingRow } from './setting-rows';

/** What the viewer asked to save. */
export interface SettingsSave {
  overrides: Record<string, number>;
  reason: string;
}

/**
 * Every health threshold of a site with its default, unit, allowed range and why it exists; editable (with a reason)
 * for those who may change them, read-only otherwise. The server's field errors show under their settings.
 */
@Component({
  selector: 'bw-settings-form',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule],
  template: `
    <section class="panel" aria-labelledby="settings-title">
      <h2 id="settings-title">Thresholds</h2>
      @if (canEdit()) {
        <p class="hint">
          Change a value and say why; a value equal to its default is stored as the default. Every save is kept in the history below and in
          the audit log.
        </p>
      } @else {
        <p class="hint" data-testid="settings-read-only">Read only: engineers and admins change these.</p>
      }
      @for (g of groups(); track g.name) {
        <h3>{{ g.name }}</h3>
        <ul class="settings">
          @for (row of g.rows; track row.key) {
            <li [attr.data-testid]="'setting-' + row.key" [class.changed]="isChanged(row)">
              <div class="words">
                <span class="label">{{ row.label }}</span>
                <span class="about">{{ row.why }}</span>
              </div>
              <div class="value">
                @if (canEdit()) {
                  <mat-form-field subscriptSizing="dynamic">
                    <mat-label>{{ row.label }}</mat-label>
                    <input
                      matInput
                      type="number"
                      [attr.min]="row.min"
                      [attr.max]="row.max"
                      [attr.step]="row.integer ? 1 : 'any'"
                      [value]="draft()[row.key] ?? row.effective"
                      (input)="edit(row.key, $any($event.target).value)"
                      [attr.aria-invalid]="!!problemOf(row)"
                      [attr.aria-describedby]="'range-' + row.key"
                      [attr.data-testid]="'input-' + row.key"
                    />
                    @if (row.unit !== '(fraction)') {
                      <span matTextSuffix>{{ row.unit }}</span>
                    }
                  </mat-form-field>
                  @if (problemOf(row); as p) {
                    <p class="field-error" role="alert" [attr.data-testid]="'error-' + row.key">
                      <mat-icon aria-hidden="true">error</mat-icon>{{ p }}
                    </p>
                  }
                } @else {
                  <strong [attr.data-testid]="'value-' + row.key">{{ valueText(row.effective, row.unit) }}</strong>
                }
                <span class="quiet" [id]="'range-' + row.key">
                  {{ row.override === null ? 'Default' : 'Site value; default' }} {{ valueText(row.defaultValue, row.unit) }} · allowed
                  {{ rangeText(row) }}{{ row.integer ? ', whole numbers' : '' }}
                </span>
                @if (canEdit() && draftValue(row) !== row.defaultValue) {
                  <button mat-button type="button" class="use-default" (click)="edit(row.key, '' + row.defaultValue)">
                    <mat-icon>undo</mat-icon>Use the default
                  </button>
                }
              </div>
            </li>
          }
        </ul>
      }
      @if (canEdit()) {
        <form class="save" (submit)="$event.preventDefault(); submit()" data-testid="settings-save-form">
          <mat-form-field subscriptSizing="dynamic" class="reason">
            <mat-label>Why these values</mat-label>
            <textarea
              matInput
              rows="2"
              required
              [attr.maxlength]="reasonMax"
              [value]="reason()"
              (input)="reason.set($any($event.target).value)"
              data-testid="settings-reason"
            ></textarea>
            <mat-hint>Required. Kept with the change, for whoever tunes this site next.</mat-hint>
          </mat-form-field>
          @if (fieldErrors()['reason']; as r) {
            <p class="field-error" role="alert" data-testid="error-reason"><mat-icon aria-hidden="true">error</mat-icon>{{ r }}</p>
          }
          <div class="actions">
            <button mat-flat-button type="submit" [disabled]="!ready()" data-testid="settings-save">
              <mat-icon>save</mat-icon>Save {{ changedCount() }} change{{ changedCount() === 1 ? '' : 's' }}
            </button>
            <span class="why" data-testid="settings-save-why">{{ saveHint() }}</span>
          </div>
        </form>
      }
    </section>
  `,
  styleUrl: '../units/unit-panel.scss',
  styles: `
    h3 {
      font: var(--mat-sys-title-small);
      margin: 16px 0 4px;
    }
    .settings {
      list-style: none;
      padding: 0;
      margin: 0;
      li {
        display: flex;
        flex-wrap: wrap;
        gap: 4px 16px;
        padding: 8px 0;
        border-top: 1px solid var(--mat-sys-outline-variant);
        &.changed {
          border-left: 4px solid var(--mat-sys-primary);
          padding-left: 8px;
        }
      }
      .words {
        flex: 1 1 280px;
        display: flex;
        flex-direction: column;
      }
      .label {
        font: var(--mat-sys-title-small);
      }
      .about {
        font: var(--mat-sys-body-small);
        color: var(--mat-sys-on-surface-variant);
      }
      .value {
        flex: 1 1 260px;
        display: flex;
        flex-direction: column;
        gap: 2px;
        mat-form-field {
          width: 100%;
          max-width: 220px;
        }
      }
    }
    .field-error {
      display: flex;
      align-items: center;
      gap: 4px;
      margin: 0;
      color: var(--mat-sys-error);
      font: var(--mat-sys-body-small);
      mat-icon {
        font-size: 16px;
        width: 16px;
        height: 16px;
      }
    }
    .use-default {
      align-self: flex-start;
    }
    .save {
      margin-top: 16px;
      padding-top: 8px;
      border-top: 1px solid var(--mat-sys-outline-variant);
      .reason {
        width: 100%;
      }
      .actions {
        display: flex;
        flex-wrap: wrap;
        align-items: center;
        gap: 8px 12px;
        margin-top: 8px;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SettingsForm {
  readonly settings = input.required<SiteHealthSettings>();
  readonly canEdit = input(false);
  /** A save is on its way. */
  readonly saving = input(false);
  /** The server's per-field messages of the last refused save. */
  readonly fieldErrors = input<Record<string, string>>({});

  readonly save = output<SettingsSave>();

  protected readonly reasonMax = HEALTH_SETTINGS_REASON_MAX;
  protected readonly valueText = valueText;
  protected readonly rangeText = rangeText;
  protected readonly rows = computed(() => settingRows(this.settings()));
  protected readonly groups = computed(() => {
    const out: { name: string; rows: SettingRow[] }[] = [];
    for (const row of this.rows()) {
      const last = out.at(-1);
      if (last?.name === row.group) last.rows.push(row);
      else out.push({ name: row.group, rows: [row] });
    }
    return out;
  });
  /** Typed values by setting; starts again from the stored values whenever new settings arrive (after a save). */
  protected readonly draft = linkedSignal<SiteHealthSettings, Record<string, string>>({
    source: this.settings,
    computation: () => ({}),
  });
  protected readonly reason = linkedSignal<SiteHealthSettings, string>({ source: this.settings, computation: () => '' });
  /** Settings edited since the server's errors came: their server message no longer applies. */
  private readonly editedSinceErrors = linkedSignal<Record<string, string>, ReadonlySet<string>>({
    source: this.fieldErrors,
    computation: () => new Set<string>(),
  });
  private readonly stored = computed(() => this.settings().overrides);
  protected readonly problems = computed(() => {
    const out: Record<string, string> = {};
    for (const row of this.rows()) {
      const text = this.draft()[row.key];
      const p = text === undefined ? null : valueProblem(row, text);
      if (p) out[row.key] = p;
    }
    return out;
  });
  protected readonly next = computed(() => overridesOf(this.rows(), this.draft()));
  protected readonly changedCount = computed(() => {
    const before = this.stored();
    const after = this.next();
    return new Set([...Object.keys(before), ...Object.keys(after)].filter((k) => before[k] !== after[k])).size;
  });
  protected readonly ready = computed(
    () =>
      !this.saving() &&
      !Object.keys(this.problems()).length &&
      !sameOverrides(this.stored(), this.next()) &&
      this.reason().trim().length > 0,
  );
  protected readonly saveHint = computed(() => {
    if (this.saving()) return 'Saving…';
    if (Object.keys(this.problems()).length) return 'Some values are outside their allowed range; see the messages under them.';
    if (sameOverrides(this.stored(), this.next())) return 'Nothing changed yet.';
    if (!this.reason().trim()) return 'Say why before saving.';
    return 'The detectors use the new values at once.';
  });

  protected edit(key: string, text: string): void {
    this.draft.set({ ...this.draft(), [key]: text });
    this.editedSinceErrors.set(new Set([...this.editedSinceErrors(), key]));
  }

  protected draftValue(row: SettingRow): number {
    const t = this.draft()[row.key];
    return t === undefined ? row.effective : Number(t);
  }

  protected isChanged(row: SettingRow): boolean {
    const t = this.draft()[row.key];
    return t !== undefined && Number(t) !== row.effective;
  }

  /** The client's own message, else the server's for a setting not edited since. */
  protected problemOf(row: SettingRow): string | null {
    return this.problems()[row.key] ?? (this.editedSinceErrors().has(row.key) ? null : (this.fieldErrors()[row.key] ?? null));
  }

  protected submit(): void {
    if (this.ready()) this.save.emit({ overrides: this.next(), reason: this.reason().trim() });
  }
}
