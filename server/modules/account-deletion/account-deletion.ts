/**
 * Deleting one's own account (DELETE /api/auth/account). Runs inside the caller's transaction, so a refusal
 * or any failure part-way leaves every table as it was.
 *
 * What goes: the user row, their memberships, their password-reset tokens, the invitations they sent that are
 * still open, the invitations they accepted (those rows hold their e-mail address), and every bench where they
 * are the only member (with all its data, by the benches' ON DELETE CASCADE).
 * What stays: what they made in benches that live on (corpora, runs, grids, evaluations, reports, activity
 * lines), with the creator set to null. The foreign keys to `users` say the same (`on delete set null` for
 * creators, `cascade` for memberships and reset tokens); the explicit updates below make the outcome independent
 * of the foreign-key pragma and keep it visible in one place.
 */
import type { EntityManager } from '@mikro-orm/core';
import { ErrorCode } from '../../../shared/api/errors';
import { conflict } from '../../http-error';
import { ActivityEvent } from '../activity/activity-event.entity';
import { ActivityRepository } from '../activity/activity.repository';
import { PasswordResetToken } from '../auth/password-reset-token.entity';
import { Bench } from '../benches/bench.entity';
import { Membership } from '../benches/membership.entity';
import { Corpus } from '../corpora/corpus.entity';
import { Evaluation } from '../evaluations/evaluation.entity';
import { EvaluationRequest } from '../evaluation-jobs/evaluation-request.entity';
import { Grid } from '../grids/grid.entity';
import { Invitation } from '../invitations/invitation.entity';
import { Report } from '../reports/report.entity';
import { Run } from '../runs/run.entity';
import { User } from '../users/user.entity';

export interface AccountDeletionResult {
  /** Names of the benches deleted because the person was their only member. */
  deletedBenches: string[];
  /** Names of the benches the person left (they keep what the person made). */
  leftBenches: string[];
}

/** "a", "a" and "b", "a", "b" and "c" with each name in quotes. */
export function listNames(names: string[]): string {
  const quoted = names.map((n) => `"${n}"`);
  if (quoted.length <= 1) return quoted.join('');
  return `${quoted.slice(0, -1).join(', ')} and ${quoted[quoted.length - 1]}`;
}

export class AccountDeletion {
  constructor(private readonly em: EntityManager) {}

  /**
   * Checks the refusal rules, then deletes. Call inside `em.transactional`; throws a 409 `HttpError`
   * (`LAST_ADMIN` or `LAST_OWNER`) before writing anything when the account may not go yet.
   */
  async run(userId: string, at: Date): Promise<AccountDeletionResult> {
    const user = await this.em.findOneOrFail(User, { id: userId });
    await this.refuseLastAdmin(user);

    const memberships = await this.em.find(Membership, { user: userId }, { populate: ['bench'], orderBy: { bench: { name: 'asc' } } });
    const benchIds = memberships.map((m) => m.bench.id);
    const counts = await this.headcounts(benchIds);
    const members = (m: Membership) => counts.get(m.bench.id)?.members ?? 0;
    const owners = (m: Membership) => counts.get(m.bench.id)?.owners ?? 0;

    const soleMember = memberships.filter((m) => members(m) <= 1);
    const shared = memberships.filter((m) => members(m) > 1);
    const blocking = shared.filter((m) => m.role === 'owner' && owners(m) <= 1);
    if (blocking.length > 0) {
      const names = blocking.map((m) => m.bench.name);
      const one = names.length === 1;
      throw conflict(
        ErrorCode.LastOwner,
        `You are the only owner of the bench${one ? '' : 'es'} ${listNames(names)}, which ${one ? 'has' : 'have'} other members. ` +
          `Make another member owner${one ? '' : ' of each'} (or delete the bench${one ? '' : 'es'}) first, then delete your account.`,
      );
    }

    const result: AccountDeletionResult = {
      deletedBenches: soleMember.map((m) => m.bench.name),
      leftBenches: shared.map((m) => m.bench.name),
    };
    await this.deleteBenches(soleMember.map((m) => m.bench));
    this.recordDepartures(user, shared.map((m) => m.bench), at);
    // Write the activity lines now, while the benches and the user still exist.
    await this.em.flush();
    await this.dropInvitations(userId);
    await this.detachCreatedThings(userId);
    await this.forgetSignInSecrets(userId);
    await this.em.nativeDelete(Membership, { user: userId });
    await this.em.nativeDelete(User, { id: userId });
    this.em.getUnitOfWork().unsetIdentity(user);
    return result;
  }

  private async refuseLastAdmin(user: User): Promise<void> {
    if (!user.isAdmin) return;
    const admins = await this.em.count(User, { isAdmin: true });
    if (admins <= 1) {
      throw conflict(
        ErrorCode.LastAdmin,
        'You are the only admin of this Noisewright instance, so your account cannot be deleted. ' +
          'Ask the person who runs the server to make another account admin first.',
      );
    }
  }

  /**
   * Members and owners per bench. The raw query runs on the transaction's connection: SQLite has one, and a query
   * outside the open transaction would wait for it forever.
   */
  private async headcounts(benchIds: string[]): Promise<Map<string, { members: number; owners: number }>> {
    const counts = new Map<string, { members: number; owners: number }>();
    if (benchIds.length === 0) return counts;
    const rows: { bench_id: string; members: number; owners: number }[] = await this.em.getConnection().execute(
      `select bench_id, count(*) as members, sum(case when role = 'owner' then 1 else 0 end) as owners
         from memberships where bench_id in (${benchIds.map(() => '?').join(',')}) group by bench_id`,
      benchIds,
      'all',
      this.em.getTransactionContext(),
    );
    for (const row of rows) counts.set(row.bench_id, { members: Number(row.members), owners: Number(row.owners) });
    return counts;
  }

  /** Benches where the person is the only member go with all their data (ON DELETE CASCADE from `benches`). */
  async deleteBenches(benches: Bench[]): Promise<void> {
    if (benches.length === 0) return;
    await this.em.nativeDelete(Bench, { id: { $in: benches.map((b) => b.id) } });
    for (const bench of benches) this.em.getUnitOfWork().unsetIdentity(bench);
  }

  private recordDepartures(user: User, benches: Bench[], at: Date): void {
    const activity = new ActivityRepository(this.em);
    for (const bench of benches) {
      activity.record(
        bench,
        null,
        'member.account_deleted',
        `${user.displayName} deleted their account and left the bench; the corpora, runs and reports they made stay here.`,
        at,
      );
    }
  }

  /** Open invitations they sent are withdrawn for good; accepted ones hold their address, so they go too. */
  async dropInvitations(userId: string): Promise<void> {
    await this.em.nativeDelete(Invitation, { invitedBy: userId, acceptedAt: null, revokedAt: null });
    await this.em.nativeDelete(Invitation, { acceptedBy: userId });
    await this.em.nativeUpdate(Invitation, { invitedBy: userId }, { invitedBy: null });
  }

  /** What they made in benches that live on stays, without a creator. */
  async detachCreatedThings(userId: string): Promise<void> {
    await this.em.nativeUpdate(Corpus, { uploadedBy: userId }, { uploadedBy: null });
    await this.em.nativeUpdate(Run, { createdBy: userId }, { createdBy: null });
    await this.em.nativeUpdate(Grid, { createdBy: userId }, { createdBy: null });
    await this.em.nativeUpdate(Evaluation, { createdBy: userId }, { createdBy: null });
    await this.em.nativeUpdate(EvaluationRequest, { createdBy: userId }, { createdBy: null });
    await this.em.nativeUpdate(Report, { createdBy: userId }, { createdBy: null });
    await this.em.nativeUpdate(ActivityEvent, { actor: userId }, { actor: null });
  }

  /** Password-reset links die with the account (sign-in tokens die with the user row: `requireAuth` finds nobody). */
  async forgetSignInSecrets(userId: string): Promise<void> {
    await this.em.nativeDelete(PasswordResetToken, { user: userId });
  }
}
