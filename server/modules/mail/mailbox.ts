/**
 * Captured mail of the local SMTP stand-in (development and tests): newest first, capped, optionally
 * appended to a JSON-lines file so it survives a restart. Captured mail may hold people's names and
 * addresses: the file lives under data/ (ignored by git) and is for local use only.
 */
import { randomUUID } from 'node:crypto';
import { appendFileSync, existsSync, mkdirSync, readFileSync } from 'node:fs';
import { dirname } from 'node:path';
import type { CapturedMail } from '../../../shared/api/types';

export class Mailbox {
  private items: CapturedMail[] = [];
  private readonly waiters = new Set<() => void>();
  readonly capacity: number;
  private readonly file: string;

  constructor(options: { capacity?: number; file?: string } = {}) {
    this.capacity = options.capacity ?? 200;
    this.file = options.file ?? '';
    this.loadFile();
  }

  add(mail: Omit<CapturedMail, 'id' | 'receivedAt'> & { receivedAt?: string }): CapturedMail {
    const stored: CapturedMail = { id: randomUUID(), receivedAt: mail.receivedAt ?? new Date().toISOString(), ...mail };
    this.items.unshift(stored);
    if (this.items.length > this.capacity) this.items.length = this.capacity;
    if (this.file) {
      try {
        mkdirSync(dirname(this.file), { recursive: true });
        appendFileSync(this.file, `${JSON.stringify(stored)}\n`, 'utf8');
      } catch (error) {
        console.error(`Could not append captured mail to ${this.file}:`, error);
      }
    }
    for (const wake of [...this.waiters]) wake();
    return stored;
  }

  /** Newest first. */
  list(): CapturedMail[] {
    return [...this.items];
  }

  clear(): void {
    this.items = [];
  }

  /** Resolves with the newest message matching `predicate`, waiting for it to arrive if needed. */
  waitFor(predicate: (mail: CapturedMail) => boolean, timeoutMs = 10_000): Promise<CapturedMail> {
    return new Promise((resolvePromise, reject) => {
      const check = (): boolean => {
        const found = this.items.find(predicate);
        if (!found) return false;
        this.waiters.delete(check);
        clearTimeout(timer);
        resolvePromise(found);
        return true;
      };
      const timer = setTimeout(() => {
        this.waiters.delete(check);
        reject(new Error(`No matching mail arrived within ${timeoutMs} ms (mailbox has ${this.items.length}).`));
      }, timeoutMs);
      if (!check()) this.waiters.add(check);
    });
  }

  private loadFile(): void {
    if (!this.file || !existsSync(this.file)) return;
    const lines = readFileSync(this.file, 'utf8').split('\n').filter((line) => line.trim() !== '');
    for (const line of lines.slice(-this.capacity)) {
      try {
        const mail = JSON.parse(line) as CapturedMail;
        if (typeof mail.id === 'string' && typeof mail.subject === 'string') this.items.unshift(mail);
      } catch {
        // A torn last line after a crash: skip it.
      }
    }
  }
}
