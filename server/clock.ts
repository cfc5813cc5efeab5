/** Source of the current time; tests pass a `ManualClock` to step past expiry dates. */
export interface Clock {
  now(): Date;
}

export const systemClock: Clock = { now: () => new Date() };

export class ManualClock implements Clock {
  private current: number;
  constructor(start: Date | string | number = Date.now()) {
    this.current = new Date(start).getTime();
  }
  now(): Date {
    return new Date(this.current);
  }
  advance(ms: number): void {
    this.current += ms;
  }
  set(time: Date | string | number): void {
    this.current = new Date(time).getTime();
  }
}
