import { DatePipe } from '@angular/common';
import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, OnInit, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatIconModule } from '@angular/material/icon';
import { firstValueFrom } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { CapturedMail as Mail } from '../../core/api-types';
import { MailPiece, splitMailText } from './mail-text';

interface ShownMail extends Mail { pieces: MailPiece[] }

/** Mail caught by the local SMTP stand-in (development only), newest first, with clickable links. */
@Component({
  selector: 'nw-captured-mail',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, MatExpansionModule, MatButtonModule, MatIconModule],
  templateUrl: './captured-mail.html',
  styles: `.nw-mail-text { white-space: pre-wrap; font-family: var(--nw-mono); font-size: 13px; line-height: 1.5; margin: 0; }
    .nw-mail-meta { color: var(--mat-sys-on-surface-variant); margin: 0 0 8px; }
    .nw-local { margin-left: 8px; font-family: var(--mat-sys-body-medium-font); }
    .nw-title-row { display: flex; align-items: center; justify-content: space-between; }
    mat-panel-description { justify-content: flex-end; font-family: var(--nw-mono); }`,
})
export class CapturedMailList implements OnInit {
  private readonly http = inject(HttpClient);
  protected readonly mails = signal<ShownMail[]>([]);
  protected readonly problem = signal<string | null>(null);
  protected readonly loaded = signal(false);

  async ngOnInit(): Promise<void> {
    await this.load();
  }

  protected async load(): Promise<void> {
    try {
      const mails = await firstValueFrom(this.http.get<Mail[]>('/api/admin/mail'));
      const sorted = [...mails].sort((a, b) => b.receivedAt.localeCompare(a.receivedAt));
      this.mails.set(sorted.map((m) => ({ ...m, pieces: splitMailText(m.text, location.origin) })));
      this.problem.set(null);
    } catch (error) {
      this.problem.set(`Could not load the captured mail. ${messageOf(error)}`);
    } finally {
      this.loaded.set(true);
    }
  }
}
