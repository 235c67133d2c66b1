import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { ROLE_LABELS } from './roles';
import { Session } from './session';

@Component({
  selector: 'bw-no-access',
  imports: [MatButtonModule, MatIconModule, RouterLink],
  template: `
    <section class="page empty-state" aria-labelledby="no-access-title">
      <mat-icon aria-hidden="true">block</mat-icon>
      <h1 id="no-access-title">No access to this page</h1>
      <p>
        Your role{{ roleLabel() ? ' (' + roleLabel() + ')' : '' }} does not include this page. If you need it for your work, ask a
        Brightward administrator to change your role.
      </p>
      <a mat-flat-button routerLink="/"><mat-icon>home</mat-icon>Go to your start page</a>
    </section>
  `,
  styles: `
    h1 {
      font: var(--mat-sys-headline-small);
      color: var(--mat-sys-on-surface);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NoAccess {
  private readonly session = inject(Session);
  protected readonly roleLabel = computed(() => {
    const role = this.session.role();
    return role ? ROLE_LABELS[role].label : null;
  });
}
