/**
 * Character n-gram model with interpolated Kneser–Ney smoothing (MODEL.md §6).
 *
 * Method: interpolated **modified** Kneser–Ney of Chen & Goodman (1998), with three discounts per order
 * (D1 for n-grams seen once, D2 twice, D3+ three or more times) estimated from count-of-counts:
 *   Y = n1 / (n1 + 2 n2),  D1 = 1 − 2Y n2/n1,  D2 = 2 − 3Y n3/n2,  D3+ = 3 − 4Y n4/n3,
 * with a fallback on small corpora (see `estimateDiscounts`).
 * Option `discount: number` switches to the original interpolated Kneser–Ney (Kneser & Ney 1995) with one
 * fixed discount D for every count and order.
 *
 *   p_k(w | h) = max(c_k(hw) − D(c_k(hw)), 0) / c_k(h·) + γ_k(h) · p_{k−1}(w | h')      (h' = h without its first symbol)
 *   γ_k(h)     = Σ_w min(D(c_k(hw)), c_k(hw)) / c_k(h·)
 *   p_0(w)     = 1 / |predictable symbols|  (the alphabet plus EOW; the start symbol is never predicted)
 * If the context h was never seen at order k, p_k(w | h) = p_{k−1}(w | h').
 * Counts c_k: the highest order uses raw (token-weighted) counts; a lower order uses continuation counts
 * N1+(·hw), the number of distinct symbols seen before hw, except for n-grams that begin with the start
 * symbol, which cannot be extended to the left and keep their raw counts (the usual treatment of padded
 * sentence starts). Words are padded with order−1 start symbols and end with EOW (id 0).
 * All probabilities are exact and sum to one over the V symbols in every context, seen or not.
 */
import type { Alphabet } from '../data/encode';
import { isKnDiscount, KN_DISCOUNT_RANGE, SETTING_LIMITS } from './settings-rules';

export interface NgramWordCount { word: string; count: number }

export interface NgramOptions {
  order: number;
  /** A fixed discount (original interpolated KN); leave out for modified KN with estimated D1, D2, D3+. */
  discount?: number;
}

/** JSON form (see `toJSON` / `fromJSON`). */
export interface NgramJson {
  kind: 'ngram-kn';
  version: 1;
  order: number;
  chars: string[];
  fixedDiscount: number | null;
  /** discounts[k-1] = [D1, D2, D3+] for order k. */
  discounts: [number, number, number][];
  /** tables[k-1] = list of [context key, [[symbol id, count], ...]] at order k. */
  tables: [string, [number, number][]][][];
}

const BOS = -1;
const EOW = 0;

interface ContextEntry { total: number; gammaMass: number; next: Map<number, number> }

export class KneserNeyModel {
  readonly order: number;
  readonly chars: string[];
  readonly fixedDiscount: number | null;
  readonly discounts: [number, number, number][];
  private readonly tables: Map<string, ContextEntry>[];
  private readonly charIds: Map<string, number>;

  private constructor(order: number, chars: string[], fixedDiscount: number | null,
                      discounts: [number, number, number][], raw: Map<string, Map<number, number>>[]) {
    this.order = order;
    this.chars = chars;
    this.fixedDiscount = fixedDiscount;
    this.discounts = discounts;
    this.charIds = new Map(chars.map((c, i) => [c, i + 1]));
    this.tables = raw.map((table, k) => {
      const out = new Map<string, ContextEntry>();
      for (const [ctx, next] of table) {
        let total = 0;
        let gammaMass = 0;
        for (const c of next.values()) {
          total += c;
          gammaMass += Math.min(discountFor(discounts[k], c), c);
        }
        out.set(ctx, { total, gammaMass, next });
      }
      return out;
    });
  }

  /** Vocabulary size V = characters + EOW (ids as in shared/data/encode.ts). */
  get size(): number { return this.chars.length + 1; }

  static estimate(words: NgramWordCount[], alphabet: Alphabet, options: NgramOptions): KneserNeyModel {
    const order = options.order;
    const [minOrder, maxOrder] = SETTING_LIMITS.ngramOrder;
    if (!Number.isInteger(order) || order < minOrder || order > maxOrder) {
      throw new Error(`The n-gram order must be a whole number from ${minOrder} to ${maxOrder} (got ${order}).`);
    }
    if (options.discount !== undefined && !isKnDiscount(options.discount)) {
      throw new Error(`The fixed discount must be in ${KN_DISCOUNT_RANGE.text} (got ${options.discount}).`);
    }
    if (words.length === 0) throw new Error('The corpus is empty: give at least one word to fit the n-gram model.');
    const charIds = new Map(alphabet.chars.map((c, i) => [c, i + 1]));
    // rawCounts[k-1]: full n-gram key (k symbols) -> raw token-weighted count
    const rawCounts: Map<string, number>[] = Array.from({ length: order }, () => new Map());
    for (const { word, count } of words) {
      if (!(count > 0) || !Number.isFinite(count)) {
        throw new Error(`The count of "${word}" must be a positive number (got ${count}).`);
      }
      const seq = paddedIds(word, charIds, order);
      for (let i = order - 1; i < seq.length; i++) {
        for (let k = 1; k <= order; k++) {
          const key = seq.slice(i - k + 1, i + 1).join(',');
          const m = rawCounts[k - 1];
          m.set(key, (m.get(key) ?? 0) + count);
        }
      }
    }
    // Adjusted counts per order: raw at the top order and for start-padded n-grams, continuation otherwise.
    const adjusted: Map<string, number>[] = Array.from({ length: order }, () => new Map());
    for (const [key, c] of rawCounts[order - 1]) adjusted[order - 1].set(key, c);
    for (let k = order - 1; k >= 1; k--) {
      const m = adjusted[k - 1];
      for (const [key, c] of rawCounts[k - 1]) {
        if (key.startsWith(`${BOS},`) || key === `${BOS}`) m.set(key, c);
      }
      for (const key of rawCounts[k].keys()) {
        const suffix = key.slice(key.indexOf(',') + 1);
        if (suffix.startsWith(`${BOS},`)) continue;
        m.set(suffix, (m.get(suffix) ?? 0) + 1);
      }
    }
    const fixed = options.discount ?? null;
    const discounts: [number, number, number][] = [];
    for (const m of adjusted) {
      discounts.push(fixed !== null ? [fixed, fixed, fixed] : estimateDiscounts(m.values(), discounts.at(-1)));
    }
    const raw = adjusted.map((m) => {
      const table = new Map<string, Map<number, number>>();
      for (const [key, c] of m) {
        const cut = key.lastIndexOf(',');
        const ctx = cut < 0 ? '' : key.slice(0, cut);
        const sym = Number(cut < 0 ? key : key.slice(cut + 1));
        let next = table.get(ctx);
        if (!next) table.set(ctx, (next = new Map()));
        next.set(sym, c);
      }
      return table;
    });
    return new KneserNeyModel(order, alphabet.chars.slice(), fixed, discounts, raw);
  }

  /** Exact log p(word) in nats, EOW included. Throws on a character outside the alphabet. */
  logProb(word: string): number {
    const seq = paddedIds(word, this.charIds, this.order);
    let lp = 0;
    for (let i = this.order - 1; i < seq.length; i++) {
      lp += Math.log(this.prob(seq.slice(i - this.order + 1, i), seq[i]));
    }
    return lp;
  }

  /** Distribution over the next symbol (index = id; 0 = EOW) after the characters of `prefix`. */
  nextDistribution(prefix: string): Float64Array {
    const seq = paddedIds(prefix, this.charIds, this.order);
    seq.pop(); // drop the EOW appended by paddedIds
    const ctx = seq.slice(seq.length - (this.order - 1));
    const out = new Float64Array(this.size);
    for (let v = 0; v < this.size; v++) out[v] = this.prob(ctx, v);
    return out;
  }

  /** p(sym | ctx) where ctx holds the last order−1 symbols (start symbols included). */
  private prob(ctx: number[], sym: number): number {
    let p = 1 / this.size;
    for (let k = 1; k <= this.order; k++) {
      const key = ctx.slice(ctx.length - (k - 1)).join(',');
      const entry = this.tables[k - 1].get(k === 1 ? '' : key);
      if (!entry) continue;
      const c = entry.next.get(sym) ?? 0;
      const d = c > 0 ? Math.min(discountFor(this.discounts[k - 1], c), c) : 0;
      p = (c - d) / entry.total + (entry.gammaMass / entry.total) * p;
    }
    return p;
  }

  /** Number of stored n-gram entries (the model's "parameter count"). */
  get entryCount(): number {
    let n = 0;
    for (const t of this.tables) for (const e of t.values()) n += e.next.size;
    return n;
  }

  toJSON(): NgramJson {
    return {
      kind: 'ngram-kn', version: 1, order: this.order, chars: this.chars.slice(),
      fixedDiscount: this.fixedDiscount,
      discounts: this.discounts.map((d) => [d[0], d[1], d[2]] as [number, number, number]),
      tables: this.tables.map((t) => [...t].map(([ctx, e]) => [ctx, [...e.next]] as [string, [number, number][]])),
    };
  }

  static fromJSON(json: unknown): KneserNeyModel {
    const j = json as Partial<NgramJson> | null;
    if (!j || j.kind !== 'ngram-kn') throw new Error('This is not a saved Kneser–Ney n-gram model (kind is not "ngram-kn").');
    if (j.version !== 1) throw new Error(`Unsupported n-gram model version ${String(j.version)}; this build reads version 1.`);
    const order = j.order;
    if (typeof order !== 'number' || order < 1 || order > 6 || !Array.isArray(j.chars) || !Array.isArray(j.tables)
      || j.tables.length !== order || !Array.isArray(j.discounts) || j.discounts.length !== order) {
      throw new Error('The saved n-gram model is damaged: order, characters, discounts or tables are missing or inconsistent.');
    }
    const raw = j.tables.map((t) => new Map(t.map(([ctx, next]) => [ctx, new Map(next)] as [string, Map<number, number>])));
    return new KneserNeyModel(order, j.chars.slice(), j.fixedDiscount ?? null,
      j.discounts.map((d) => [d[0], d[1], d[2]] as [number, number, number]), raw);
  }
}

function discountFor(d: [number, number, number], c: number): number {
  return c <= 1 ? d[0] : c <= 2 ? d[1] : d[2];
}

/**
 * Discounts of one order from the count-of-counts n1..n4 of its (adjusted) counts; counts that are not whole
 * numbers are bucketed by rounding.
 *
 * Modified KN, Chen & Goodman (1998), "An empirical study of smoothing techniques for language modeling",
 * Harvard TR-10-98, §4.1.6 (from memory, section number not checked):
 *   Y = n1/(n1 + 2 n2),  D1 = 1 − 2Y n2/n1,  D2 = 2 − 3Y n3/n2,  D3+ = 3 − 4Y n4/n3.
 * Each D_i is kept when its counts-of-counts exist and it lies in its valid range 0 < D_i < i. Otherwise (small
 * or weighted corpora: with no 4-counts D3+ = 3, which wipes out every n-gram seen three times) that D_i falls
 * back to the next lower order's D_i (`lower`), as the widely used language-model toolkits do when the closed
 * form fails (from memory); at order 1 to the single absolute discount D = n1/(n1 + 2 n2) of Ney, Essen & Kneser
 * (1994), the estimate Chen & Goodman (1998) use for original KN (from memory), which lies in (0, 1); and with
 * neither n1 nor n2, to 0.5 — common practice (no source).
 */
export function estimateDiscounts(counts: Iterable<number>, lower?: [number, number, number]): [number, number, number] {
  const n = [0, 0, 0, 0, 0];
  for (const c of counts) {
    const r = Math.round(c);
    if (r >= 1 && r <= 4) n[r]++;
  }
  const y = n[1] > 0 && n[2] > 0 ? n[1] / (n[1] + 2 * n[2]) : NaN;
  const est = [
    n[1] > 0 ? 1 - 2 * y * (n[2] / n[1]) : NaN,
    n[2] > 0 ? 2 - 3 * y * (n[3] / n[2]) : NaN,
    n[3] > 0 && n[4] > 0 ? 3 - 4 * y * (n[4] / n[3]) : NaN,
  ];
  return est.map((d, i) => (d > 0 && d < i + 1 ? d : lower ? lower[i] : y > 0 ? y : 0.5)) as [number, number, number];
}

function paddedIds(word: string, charIds: Map<string, number>, order: number): number[] {
  const seq: number[] = new Array<number>(order - 1).fill(BOS);
  for (const ch of Array.from(word)) {
    const id = charIds.get(ch);
    if (id === undefined) {
      throw new Error(`The character "${ch}" in "${word}" is not in the model's alphabet; normalise the word or refit the model on a corpus that contains it.`);
    }
    seq.push(id);
  }
  seq.push(EOW);
  return seq;
}
