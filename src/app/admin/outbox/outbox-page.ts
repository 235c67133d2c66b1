import { ChangeDetectionStrategy, Component, inject, OnInit, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import type { MailStatus, OutboxMessage } from '../../../../shared/contracts/mail';
import { NotificationApi } from '../../core/notification-api';
import { toApiProblem } from '../../ui/api-error';

/** How each delivery status reads. */
export const STATUS_LOOKS: Record<MailStatus, { label: string; icon: string }> = {
  queued: { label: 'Waiting to go', icon: 'schedule_send' },
  sent: { label: 'Sent', icon: 'mark_email_read' },
  failed: { label: 'Not delivered', icon: 'error' },
};

/** The mail outbox for admins: every message the server sent, newest first, with its delivery. */
@Component({
  selector: 'bw-outbox-page',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule, MatTableModule, MatTooltipModule],
  templateUrl: './outbox-page.html',
  styleUrl: './outbox-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OutboxPage implements OnInit {
  private readonly api = inject(NotificationApi);

  protected readonly columns = ['createdAt', 'to', 'subject', 'status', 'attachments'];
  protected readonly statuses = Object.entries(STATUS_LOOKS).map(([value, look]) => ({ value: value as MailStatus, ...look }));
  protected readonly status = signal<MailStatus | ''>('');
  protected readonly messages = signal<OutboxMessage[]>([]);
  protected readonly loading = signal(false);
  protected readonly loaded = signal(false);
  protected readonly problem = signal<string | null>(null);

  ngOnInit(): void {
    this.reload();
  }

  protected setStatus(value: MailStatus | ''): void {
    this.status.set(value);
    this.reload();
  }

  protected reload(): void {
    this.loading.set(true);
    this.problem.set(null);
    this.api.outbox(this.status() || undefined).subscribe({
      next: (list) => {
        this.messages.set(list);
        this.loading.set(false);
        this.loaded.set(true);
      },
      error: (error: unknown) => {
        this.messages.set([]);
        this.loading.set(false);
        this.problem.set(toApiProblem(error).message);
      },
    });
  }

  protected lookOf(s: MailStatus) {
    return STATUS_LOOKS[s];
  }

  protected time(iso: string): string {
    return new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'medium' });
  }

  protected utc(iso: string): string {
    return `${iso.slice(0, 19).replace('T', ' ')} UTC`;
  }
}
