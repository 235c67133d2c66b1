import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';

@Component({
  selector: 'bw-not-found',
  imports: [MatButtonModule, MatIconModule, RouterLink],
  template: `
    <section class="page empty-state" aria-labelledby="not-found-title">
      <mat-icon aria-hidden="true">explore_off</mat-icon>
      <h1 id="not-found-title">Page not found</h1>
      <p>There is nothing at this address. It may have moved, or the link may be incomplete.</p>
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
export class NotFound {}
