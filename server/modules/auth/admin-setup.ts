/**
 * Who becomes the instance's first admin. In development and tests: the first account (as before). In
 * production: while no admin exists, the account signing up with `ADMIN_EMAIL`, or the one that sends the
 * one-time setup code printed in the server log at start; the code works once.
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { Config } from '../../config';
import type { Logger } from '../../logging';
import type { UserRepository } from '../users/user.repository';

export class AdminSetup {
  private code: string | null;

  constructor(private readonly config: Pick<Config, 'devMode' | 'adminEmail'>) {
    this.code = config.devMode ? null : randomBytes(9).toString('base64url');
  }

  /** Prints the setup code when production has no admin yet (and no ADMIN_EMAIL names one). */
  announce(logger: Logger, adminCount: number): void {
    if (this.config.devMode || adminCount > 0 || !this.code) return;
    if (this.config.adminEmail) {
      logger.warn('No admin yet: the account that signs up with ADMIN_EMAIL becomes the admin.');
      return;
    }
    logger.warn(`No admin yet. One-time setup code for the first admin: ${this.code} (send it as setupCode when signing up).`);
  }

  async grantsAdmin(users: UserRepository, email: string, setupCode: string | undefined): Promise<boolean> {
    if (this.config.devMode) return (await users.count()) === 0;
    if ((await users.countAdmins()) > 0) return false;
    if (this.config.adminEmail && email === this.config.adminEmail) return true;
    if (!this.code || !setupCode) return false;
    const a = Buffer.from(setupCode);
    const b = Buffer.from(this.code);
    if (a.length !== b.length || !timingSafeEqual(a, b)) return false;
    this.code = null;
    return true;
  }
}
