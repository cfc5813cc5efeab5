import { Injectable, inject } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';

/** Short messages at the bottom of the screen after an action. */
@Injectable({ providedIn: 'root' })
export class Notice {
  private readonly snackBar = inject(MatSnackBar);

  done(message: string): void {
    this.snackBar.open(message, 'Close', { duration: 4000, panelClass: 'nw-notice-done' });
  }

  problem(message: string): void {
    this.snackBar.open(message, 'Close', { duration: 8000, panelClass: 'nw-notice-problem' });
  }
}
