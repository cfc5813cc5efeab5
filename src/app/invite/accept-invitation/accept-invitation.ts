import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, computed, inject, input, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { CurrentBench } from '../../benches/current-bench';
import { BenchesApi } from '../../benches/benches-api';
import { ApiError, messageOf } from '../../core/api-error';
import { InvitationPreview } from '../../core/api-types';
import { AuthStore } from '../../core/auth-store';
import { ROLE_HINTS, RoleLabelPipe } from '../../ui/role-label';

/** `/invite/:token`: shows what the invitation is for and lets the invited person join the bench. */
@Component({
  selector: 'nw-accept-invitation',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, DatePipe, MatButtonModule, MatIconModule, MatProgressBarModule, RoleLabelPipe],
  templateUrl: './accept-invitation.html',
  styleUrl: '../../auth/auth-page.scss',
})
export class AcceptInvitation implements OnInit {
  readonly token = input.required<string>();

  private readonly api = inject(BenchesApi);
  private readonly benches = inject(CurrentBench);
  private readonly router = inject(Router);
  protected readonly auth = inject(AuthStore);
  protected readonly preview = signal<InvitationPreview | null>(null);
  protected readonly loading = signal(true);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly roleHints = ROLE_HINTS;
  protected readonly here = computed(() => `/invite/${this.token()}`);
  protected readonly emailMatches = computed(() => {
    const invited = this.preview()?.email.toLowerCase();
    return invited !== undefined && invited === this.auth.user()?.email.toLowerCase();
  });

  async ngOnInit(): Promise<void> {
    try {
      this.preview.set(await this.api.previewInvitation(this.token()));
    } catch (error) {
      this.problem.set(error instanceof ApiError && (error.status === 404 || error.status === 410)
        ? 'This invitation link has been used, revoked or has expired. Ask the person who invited you for a new one.'
        : messageOf(error));
    } finally {
      this.loading.set(false);
    }
  }

  protected async accept(): Promise<void> {
    this.problem.set(null);
    this.busy.set(true);
    try {
      const { benchId } = await this.api.acceptInvitation(this.token());
      await this.benches.refreshList().catch(() => undefined);
      await this.router.navigate(['/benches', benchId]);
    } catch (error) {
      this.problem.set(messageOf(error));
    } finally {
      this.busy.set(false);
    }
  }

  protected async switchAccount(): Promise<void> {
    await this.auth.signOut();
    await this.router.navigate(['/sign-in'], {
      queryParams: { returnUrl: this.here(), email: this.preview()?.email ?? null },
    });
  }
}
