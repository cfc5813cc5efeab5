/**
 * Seeded randomness for everything a user can ask to repeat (splits, batches, initial weights, noise).
 *
 * Built on the `seedrandom` package's Alea generator (53-bit fractions via `double()`), which runs the same
 * in Node, the browser and web workers. Framework-free: no Node built-ins, no DOM.
 */
import seedrandom from 'seedrandom';

export interface Rng {
  /** Uniform in [0, 1). */
  next(): number;
  /** Standard normal N(0, 1) (Marsaglia's polar method). */
  normal(): number;
  /** Uniform integer in [0, n); `n` must be a positive integer. */
  int(n: number): number;
  /**
   * A new, independent stream derived deterministically from this stream's seed and `label` only
   * (not from how many numbers were drawn so far): `rng.fork('init')` always gives the same stream for
   * the same root seed. Forks nest: `rng.fork('a').fork('b')`.
   */
  fork(label: string): Rng;
  /** A uniformly chosen element; throws on an empty list. */
  pick<T>(items: readonly T[]): T;
  /** A shuffled copy (Fisher–Yates); the input is not changed. */
  shuffle<T>(items: readonly T[]): T[];
  /** An integer seed in [0, 2^31) for APIs that take a numeric seed (e.g. `tf.randomNormal`). */
  seed(): number;
  /** The seed string this stream was created from (root seed plus fork labels). */
  readonly seedText: string;
}

function seedToText(seed: number | string): string {
  if (typeof seed === 'number') {
    if (!Number.isFinite(seed)) throw new Error(`Random seed must be a finite number or a string; got ${seed}.`);
    return `n:${seed}`;
  }
  if (typeof seed !== 'string') throw new Error('Random seed must be a number or a string.');
  return `s:${seed}`;
}

class AleaRng implements Rng {
  private readonly prng: seedrandom.PRNG;
  private spare: number | null = null;

  constructor(readonly seedText: string) {
    this.prng = seedrandom.alea(seedText);
  }

  next(): number {
    return this.prng.double();
  }

  normal(): number {
    if (this.spare !== null) {
      const s = this.spare;
      this.spare = null;
      return s;
    }
    // Marsaglia polar method: two independent N(0,1) values per accepted point in the unit disc.
    let u = 0;
    let v = 0;
    let s = 0;
    do {
      u = 2 * this.next() - 1;
      v = 2 * this.next() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    this.spare = v * f;
    return u * f;
  }

  int(n: number): number {
    if (!Number.isInteger(n) || n <= 0) throw new Error(`rng.int(n) needs a positive integer n; got ${n}.`);
    return Math.floor(this.next() * n);
  }

  fork(label: string): Rng {
    return new AleaRng(`${this.seedText}/${label}`);
  }

  pick<T>(items: readonly T[]): T {
    if (items.length === 0) throw new Error('rng.pick needs a non-empty list.');
    return items[this.int(items.length)] as T;
  }

  shuffle<T>(items: readonly T[]): T[] {
    const out = items.slice();
    for (let i = out.length - 1; i > 0; i--) {
      const j = this.int(i + 1);
      const tmp = out[i] as T;
      out[i] = out[j] as T;
      out[j] = tmp;
    }
    return out;
  }

  seed(): number {
    return Math.floor(this.next() * 2147483648);
  }
}

/** A seeded stream: the same seed gives the same numbers on every platform. */
export function createRng(seed: number | string): Rng {
  return new AleaRng(seedToText(seed));
}
