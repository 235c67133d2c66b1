import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDividerModule } from '@angular/material/divider';
import { MatIconModule } from '@angular/material/icon';
import { MatListModule } from '@angular/material/list';
import { MatMenuModule } from '@angular/material/menu';
import { MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { MatTooltipModule } from '@angular/material/tooltip';
import { Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { map } from 'rxjs';
import { ROLE_LABELS } from '../auth/roles';
import { NotificationBell } from '../notifications/notification-bell';
import { Session } from '../auth/session';
import { Notify } from '../ui/notify';
import { toApiProblem } from '../ui/api-error';
import { ColourScheme, SCHEME_LABELS } from './colour-scheme';
import { NavItem, navItemsFor } from './nav-items';

/** Below this width the navigation becomes a drawer that opens over the page. */
const NARROW = '(max-width: 899.98px)';

@Component({
  selector: 'bw-shell',
  imports: [
    MatButtonModule,
    MatDividerModule,
    MatIconModule,
    MatListModule,
    MatMenuModule,
    MatSidenavModule,
    MatToolbarModule,
    MatTooltipModule,
    NotificationBell,
    RouterLink,
    RouterLinkActive,
    RouterOutlet,
  ],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shell {
  private readonly session = inject(Session);
  private readonly router = inject(Router);
  private readonly notify = inject(Notify);
  protected readonly scheme = inject(ColourScheme);

  protected readonly narrow = toSignal(
    inject(BreakpointObserver)
      .observe(NARROW)
      .pipe(map((state) => state.matches)),
    { initialValue: false },
  );
  protected readonly me = this.session.me;
  protected readonly roleLabel = computed(() => {
    const role = this.session.role();
    return role ? ROLE_LABELS[role] : null;
  });
  protected readonly groups = computed(() => {
    const groups: { name: NavItem['group']; items: NavItem[] }[] = [];
    for (const item of navItemsFor(this.session.role())) {
      const group = groups.find((candidate) => candidate.name === item.group);
      if (group) group.items.push(item);
      else groups.push({ name: item.group, items: [item] });
    }
    return groups;
  });
  protected readonly schemeLabel = computed(() => SCHEME_LABELS[this.scheme.current()]);

  protected signOut(): void {
    this.session.signOut().subscribe({
      next: () => void this.router.navigate(['/sign-in']),
      error: (error: unknown) => {
        // The local session is dropped either way; say so if the server did not confirm.
        this.notify.problem(`Signed out here, but the server did not confirm: ${toApiProblem(error).message}`);
        void this.router.navigate(['/sign-in']);
      },
    });
  }
}
