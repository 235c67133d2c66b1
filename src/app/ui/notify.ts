import { inject, Injectable } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';

/** Short messages at the bottom of the screen: confirmations fade, problems stay until closed. */
@Injectable({ providedIn: 'root' })
export class Notify {
  private readonly snackBar = inject(MatSnackBar);

  done(message: string): void {
    this.snackBar.open(message, 'Close', { duration: 5000 });
  }

  problem(message: string): void {
    this.snackBar.open(message, 'Close', { politeness: 'assertive' });
  }
}
