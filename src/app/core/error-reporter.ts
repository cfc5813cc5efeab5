import { ErrorHandler, Injectable } from '@angular/core';

/**
 * Global handler: it only reports. Pages catch their own request errors and show what to do;
 * whatever reaches this point is a programming error, written to the console for the developer.
 */
@Injectable()
export class ErrorReporter implements ErrorHandler {
  readonly reported: unknown[] = [];

  handleError(error: unknown): void {
    this.reported.push(error);
    if (this.reported.length > 50) this.reported.shift();
    console.error('Noisewright: unexpected error', error);
  }
}
