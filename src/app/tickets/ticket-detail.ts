import { ChangeDetectionStrategy, Component, computed, DestroyRef, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import type { Site, Unit } from '../../../shared/contracts/api';
import type { UnitLiveState } from '../../../shared/contracts/live';
import { UnitApi } from '../core/unit-api';
import { LiveConnection } from '../live/live-connection';
import { statusLook, withUnit } from '../live/unit-status';
import {
  AVAILABILITY_CATEGORIES,
  CLOSURE_ACTIONS,
  ROOT_CAUSE_CLASSES,
  WAITING_REASONS,
  ruleFor,
  type AvailabilityCategory,
  type ClosureAction,
  type RootCauseClass,
  type TicketState,
} from '../../../shared/contracts/tickets';
import { TICKET_FILE_MAX_BYTES, TICKET_FILE_TYPES } from '../../../shared/contracts/tickets';
import { may } from '../../../shared/contracts/permissions';
import { Session } from '../auth/session';
import { SiteApi } from '../core/site-api';
import { TicketApi, type TicketMove, type TicketView } from '../core/ticket-api';
import { alarmKindLabel, severityLook } from '../live/alarm-look';
import { siteTime, utcTime } from '../live/unit-status';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';
import { CHECK_IN_CAUTIONS, CLOCK_LABEL, CLOCK_STATUS_LOOK, MOVE_LABEL, WAITING_REASON_LABEL, stateLook } from './ticket-look';

const words = (s: string) => s.replace(/-/g, ' ').replace(/^o and m$/, 'O&M');

/** One ticket: what and where, its SLA clocks, the moves the signed-in person may make, its history and its alarms. */
@Component({
  selector: 'bw-ticket-detail',
  imports: [
    FormsModule,
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    RouterLink,
  ],
  templateUrl: './ticket-detail.html',
  styleUrl: './ticket-detail.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TicketDetail {
  private readonly api = inject(TicketApi);
  private readonly siteApi = inject(SiteApi);
  private readonly notify = inject(Notify);
  private readonly unitApi = inject(UnitApi);
  private readonly live = inject(LiveConnection);
  private readonly destroyRef = inject(DestroyRef);
  private watching: number | null = null;

  /** The ticket's unit as it is now (live), and where it stands on the site plan. */
  protected readonly unit = signal<Unit | null>(null);
  protected readonly unitNow = signal<UnitLiveState | null>(null);
  protected readonly unitLook = computed(() => statusLook(this.unitNow()));
  protected readonly withUnit = withUnit;
  private readonly session = inject(Session);

  /** Route parameter. */
  readonly id = input.required<string>();

  protected readonly ticket = signal<TicketView | null>(null);
  protected readonly site = signal<Site | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly loading = signal(true);
  protected readonly assignees = signal<{ id: number; name: string }[]>([]);

  /** The move being prepared, and its fields. */
  protected readonly moving = signal<TicketState | null>(null);
  protected readonly busy = signal(false);
  protected readonly assigneeId = signal<number | null>(null);
  protected readonly confirmed = signal(false);
  protected readonly note = signal('');
  protected readonly reason = signal('');
  protected readonly component = signal('');
  protected readonly failureMode = signal('');
  protected readonly cause = signal('');
  protected readonly action = signal<ClosureAction | null>(null);
  protected readonly rootCause = signal<RootCauseClass | null>(null);
  protected readonly category = signal<AvailabilityCategory | null>(null);
  protected readonly partName = signal('');
  protected readonly partQty = signal(1);

  protected readonly rule = computed(() => {
    const t = this.ticket();
    const to = this.moving();
    return t && to ? ruleFor(t.state, to) : undefined;
  });
  protected readonly needs = computed(() => new Set(this.rule()?.needs ?? []));
  protected readonly ready = computed(() => {
    const n = this.needs();
    if ((n.has('assigneeId') || n.has('newAssignee')) && this.assigneeId() === null) return false;
    if (n.has('confirm') && !this.confirmed()) return false;
    if (n.has('note') && !this.note().trim()) return false;
    if ((n.has('reason') || n.has('waitingReason')) && !this.reason().trim()) return false;
    if (n.has('closure') && (!this.component().trim() || !this.failureMode().trim() || !this.cause().trim() || !this.action()))
      return false;
    return true;
  });

  /** The photo or document being sent, and its caption. */
  protected readonly caption = signal('');
  protected readonly uploading = signal(false);
  protected readonly fileTypes = TICKET_FILE_TYPES.join(',');
  /** Whether the signed-in person may add files now: the control room, or the crew member assigned; not once final. */
  protected readonly mayAddFiles = computed(() => {
    const t = this.ticket();
    const me = this.session.me();
    if (!t || !me || t.state === 'closed' || t.state === 'cancelled' || !may(me.role, 'addTicketFiles')) return false;
    return me.role !== 'crew' || t.assignee?.id === me.id;
  });

  protected readonly cautions = CHECK_IN_CAUTIONS;
  protected readonly waitingReasons = WAITING_REASONS;
  protected readonly waitingLabel = WAITING_REASON_LABEL;
  protected readonly closureActions = CLOSURE_ACTIONS;
  protected readonly rootCauses = ROOT_CAUSE_CLASSES;
  protected readonly categories = AVAILABILITY_CATEGORIES;
  protected readonly moveLabel = MOVE_LABEL;
  protected readonly clockLabel = CLOCK_LABEL;
  protected readonly clockLook = CLOCK_STATUS_LOOK;
  protected readonly stateLook = stateLook;
  protected readonly severityLook = severityLook;
  protected readonly kindLabel = alarmKindLabel;
  protected readonly words = words;
  protected readonly utc = utcTime;
  protected readonly holdLabel: Record<string, string> = {
    confirmed: 'confirmed by the unit',
    joined: 'added to a hold already in force',
    waiting: 'waiting for the unit to confirm',
    'not-confirmed': 'not confirmed by the unit: check it on site',
  };

  /** How long ago, in hours up to two days, then in days. */
  protected since(iso: string): string {
    const h = Math.max(0, (Date.now() - Date.parse(iso)) / 3600_000);
    return h < 48 ? `${Math.round(h * 10) / 10} h` : `${Math.floor(h / 24)} days`;
  }

  constructor() {
    this.live.messages.pipe(takeUntilDestroyed()).subscribe((msg) => {
      const id = this.watching;
      if (id === null || (msg.type !== 'units' && msg.type !== 'snapshot')) return;
      const mine = msg.units.find((u) => u.unitId === id);
      if (mine) this.unitNow.set(mine);
    });
    queueMicrotask(() => this.load());
  }

  /** Follows the ticket's unit live (once per page). */
  private followUnit(unitId: number): void {
    if (this.watching === unitId) return;
    this.watching = unitId;
    this.unitApi.get(unitId).subscribe({ next: (u) => this.unit.set(u), error: () => undefined });
    this.unitApi.state(unitId).subscribe({ next: (s) => this.unitNow.set(s), error: () => undefined });
    this.live.watch({ unitId }, this.destroyRef);
  }

  protected load(): void {
    this.loading.set(true);
    this.problem.set(null);
    this.api.get(Number(this.id())).subscribe({
      next: (t) => {
        this.loading.set(false);
        this.ticket.set(t);
        if (t.unitId !== null) this.followUnit(t.unitId);
        if (this.site()?.id !== t.siteId) this.siteApi.get(t.siteId).subscribe({ next: (s) => this.site.set(s), error: () => undefined });
      },
      error: (e: unknown) => {
        this.loading.set(false);
        const p = toApiProblem(e);
        this.problem.set(p.status === 404 ? 'No such ticket, or not one of your sites.' : `The ticket could not be loaded. ${p.message}`);
      },
    });
  }

  protected time(iso: string | null): string {
    return siteTime(iso, this.site()?.timeZone ?? 'UTC', true);
  }

  protected start(to: TicketState): void {
    this.moving.set(to);
    this.confirmed.set(false);
    this.note.set('');
    this.reason.set('');
    this.assigneeId.set(null);
    const n = ruleFor(this.ticket()!.state, to)?.needs ?? [];
    if ((n.includes('assigneeId') || n.includes('newAssignee')) && !this.assignees().length)
      this.api.assignees().subscribe({ next: (a) => this.assignees.set(a), error: () => undefined });
  }

  protected addPart(): string | null {
    return this.partName().trim() ? this.partName().trim() : null;
  }

  protected addFile(input: HTMLInputElement): void {
    const t = this.ticket();
    const file = input.files?.[0];
    input.value = '';
    if (!t || !file) return;
    if (file.size > TICKET_FILE_MAX_BYTES) {
      this.notify.problem(`Not sent: ${file.name} is larger than 10 MB.`);
      return;
    }
    this.uploading.set(true);
    this.api.addFile(t.id, file, file.name, this.caption().trim() || undefined).subscribe({
      next: () => {
        this.uploading.set(false);
        this.caption.set('');
        this.notify.done(`Added ${file.name} to ticket ${t.id}.`);
        this.load();
      },
      error: (e: unknown) => {
        this.uploading.set(false);
        this.notify.problem(`Not added. ${toApiProblem(e).message}`);
      },
    });
  }

  protected size(bytes: number): string {
    return bytes >= 1024 * 1024 ? `${(bytes / (1024 * 1024)).toFixed(1)} MB` : `${Math.max(1, Math.round(bytes / 1024))} KB`;
  }

  protected submit(): void {
    const t = this.ticket();
    const to = this.moving();
    if (!t || !to || !this.ready()) return;
    const n = this.needs();
    const part = this.addPart();
    const move: TicketMove = {
      to,
      version: t.version,
      ...(this.note().trim() ? { note: this.note().trim() } : {}),
      ...(this.reason().trim() ? { reason: this.reason().trim() } : {}),
      ...(this.assigneeId() !== null ? { assigneeId: this.assigneeId()! } : {}),
      ...(n.has('confirm') ? { confirm: true } : {}),
      ...(n.has('closure')
        ? {
            closure: {
              component: this.component().trim(),
              failureMode: this.failureMode().trim(),
              cause: this.cause().trim(),
              action: this.action()!,
              ...(this.rootCause() ? { rootCauseClass: this.rootCause()! } : {}),
            },
            ...(this.category() ? { availabilityCategory: this.category()! } : {}),
            ...(part ? { parts: [{ description: part, quantity: this.partQty() }] } : {}),
          }
        : {}),
    };
    this.busy.set(true);
    this.api.move(t.id, move).subscribe({
      next: (v) => {
        this.busy.set(false);
        this.moving.set(null);
        this.notify.done(`Ticket ${v.id}: ${stateLook(v.state).label}.`);
        this.load();
      },
      error: (e: unknown) => {
        this.busy.set(false);
        const p = toApiProblem(e);
        this.notify.problem(`Not done. ${p.message}`);
        if (p.status === 409) this.load();
      },
    });
  }
}
