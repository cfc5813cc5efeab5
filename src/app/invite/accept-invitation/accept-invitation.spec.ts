import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { Router, provideRouter } from '@angular/router';
import { InvitationPreview } from '../../core/api-types';
import { apiErrorInterceptor, authTokenInterceptor } from '../../core/auth-interceptors';
import { AuthStore } from '../../core/auth-store';
import { AcceptInvitation } from './accept-invitation';

const preview: InvitationPreview = {
  benchName: 'Harbour lab', role: 'coach', email: 'sam@example.org', invitedBy: 'Kit',
  expiresAt: '2026-12-09T10:00:00Z', accountExists: false,
};

async function setUp(signedInAs: string | null, answer: InvitationPreview | 'gone' = preview) {
  localStorage.clear();
  TestBed.configureTestingModule({
    imports: [AcceptInvitation],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      provideHttpClient(withInterceptors([authTokenInterceptor, apiErrorInterceptor])),
      provideHttpClientTesting(),
    ],
  });
  const backend = TestBed.inject(HttpTestingController);
  if (signedInAs) {
    const done = TestBed.inject(AuthStore).signIn(signedInAs, 'secret-password');
    backend.expectOne('/api/auth/signin').flush({
      token: 't', user: { id: 'u1', email: signedInAs, displayName: 'Someone', isAdmin: false, createdAt: '' },
    });
    await done;
  }
  const fixture = TestBed.createComponent(AcceptInvitation);
  fixture.componentRef.setInput('token', 'tok-1');
  fixture.detectChanges();
  const req = backend.expectOne('/api/invitations/tok-1');
  if (answer === 'gone') {
    req.flush({ error: { code: 'INVITATION_UNUSABLE', message: 'gone' } }, { status: 410, statusText: 'Gone' });
  } else {
    req.flush(answer);
  }
  await vi.waitFor(async () => {
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).querySelector('mat-progress-bar')).toBeNull();
  });
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const text = () => (fixture.nativeElement as HTMLElement).textContent ?? '';
  const link = (name: string) =>
    [...(fixture.nativeElement as HTMLElement).querySelectorAll('a')].find((a) => a.textContent?.trim() === name);
  return { fixture, backend, loader, text, link };
}

describe('AcceptInvitation', () => {
  it('tells a signed-out newcomer what the invitation is and links to sign-up with the address filled in', async () => {
    const { text, link } = await setUp(null);
    expect(text()).toContain('Kit invites sam@example.org to the bench Harbour lab as Coach');
    const href = new URL(link('Create account to accept')?.getAttribute('href') ?? '', 'http://x');
    expect(href.pathname).toBe('/sign-up');
    expect(Object.fromEntries(href.searchParams)).toEqual({ returnUrl: '/invite/tok-1', email: 'sam@example.org' });
  });

  it('offers sign-in instead when an account with the address exists', async () => {
    const { link } = await setUp(null, { ...preview, accountExists: true });
    expect(link('Create account to accept')).toBeUndefined();
    const href = new URL(link('Sign in to accept')?.getAttribute('href') ?? '', 'http://x');
    expect(href.pathname).toBe('/sign-in');
    expect(Object.fromEntries(href.searchParams)).toEqual({ returnUrl: '/invite/tok-1', email: 'sam@example.org' });
  });

  it('explains an address mismatch instead of offering to join', async () => {
    const { text, loader } = await setUp('other@example.org');
    expect(text()).toContain('You are signed in as other@example.org, but this invitation is for sam@example.org');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /^Join/ }))).toHaveLength(0);
  });

  it('accepts for the invited person and opens the bench', async () => {
    const { backend, loader } = await setUp('Sam@Example.org');
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Join Harbour lab' }))).click();
    backend.expectOne({ method: 'POST', url: '/api/invitations/tok-1/accept' }).flush({ benchId: 'b7' });
    await vi.waitFor(() => backend.expectOne('/api/benches').flush([]));
    await vi.waitFor(() => expect(navigate).toHaveBeenCalledWith(['/benches', 'b7']));
  });

  it('says what to do when the link was used, revoked or has expired', async () => {
    const { fixture } = await setUp(null, 'gone');
    const alert = (fixture.nativeElement as HTMLElement).querySelector('[role=alert]');
    expect(alert?.textContent).toContain('Ask the person who invited you for a new one.');
  });
});
