import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router, provideRouter } from '@angular/router';
import { apiErrorInterceptor, authTokenInterceptor } from '../../core/auth-interceptors';
import { AuthStore, TOKEN_STORAGE_KEY } from '../../core/auth-store';
import { Notice } from '../../core/notice';
import { DeleteAccount } from './delete-account';

const ME = { id: 'u1', email: 'kit@example.org', displayName: 'Kit', isAdmin: false, createdAt: '2026-01-01T00:00:00Z' };

async function setUp() {
  localStorage.clear();
  TestBed.configureTestingModule({
    imports: [DeleteAccount],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      provideHttpClient(withInterceptors([authTokenInterceptor, apiErrorInterceptor])),
      provideHttpClientTesting(),
    ],
  });
  const backend = TestBed.inject(HttpTestingController);
  const auth = TestBed.inject(AuthStore);
  const signedIn = auth.signIn(ME.email, 'secret-password');
  backend.expectOne('/api/auth/signin').flush({ token: 'tok-1', user: ME });
  await signedIn;
  const notice = vi.spyOn(TestBed.inject(Notice), 'done').mockImplementation(() => undefined);
  const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
  const fixture = TestBed.createComponent(DeleteAccount);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  await fixture.whenStable();
  const input = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
  const button = () => loader.getHarness(MatButtonHarness.with({ text: /Delete my account/ }));
  const field = (label: string) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
  const alertText = () => (fixture.nativeElement as HTMLElement).querySelector('[role=alert]')?.textContent ?? '';
  return { fixture, backend, auth, notice, navigate, input, button, field, alertText };
}

async function fillIn(s: Awaited<ReturnType<typeof setUp>>, password: string, email: string) {
  await (await s.input('password')).setValue(password);
  const confirm = await s.input('confirmEmail');
  await confirm.setValue(email);
  await confirm.blur();
}

describe('DeleteAccount', () => {
  it('says what goes and what stays, and keeps the button disabled until the password and the right e-mail are typed', async () => {
    const s = await setUp();
    const text = (s.fixture.nativeElement as HTMLElement).textContent ?? '';
    expect(text).toContain('What goes');
    expect(text).toContain('What stays');
    expect(text).toContain('only owner');
    expect(await (await s.button()).isDisabled()).toBe(true);

    await (await s.input('password')).setValue('secret-password');
    expect(await (await s.button()).isDisabled()).toBe(true);

    const confirm = await s.input('confirmEmail');
    await confirm.setValue('someone@example.org');
    await confirm.blur();
    expect(await (await s.button()).isDisabled()).toBe(true);
    expect(await (await s.field('Your e-mail address, to confirm')).getTextErrors())
      .toEqual(['Type kit@example.org, the address of this account.']);

    // Letter case and spaces around the address do not matter (the server normalises e-mail addresses the same way).
    await confirm.setValue(' Kit@Example.org ');
    expect(await (await s.button()).isDisabled()).toBe(false);
    s.backend.expectNone('/api/auth/account');
  });

  it('sends the password and the typed address, then signs out here and goes to the sign-in page with a notice', async () => {
    const s = await setUp();
    await fillIn(s, 'secret-password', ' Kit@Example.org ');
    await (await s.button()).click();
    const req = s.backend.expectOne({ method: 'DELETE', url: '/api/auth/account' });
    expect(req.request.body).toEqual({ password: 'secret-password', confirmEmail: 'kit@example.org' });
    expect(req.request.headers.get('Authorization')).toBe('Bearer tok-1');
    req.flush(null, { status: 204, statusText: 'No Content' });

    await vi.waitFor(() => expect(s.navigate).toHaveBeenCalledWith(['/sign-in']));
    expect(s.auth.signedIn()).toBe(false);
    expect(localStorage.getItem(TOKEN_STORAGE_KEY)).toBeNull();
    expect(s.notice).toHaveBeenCalledWith(expect.stringContaining('account is deleted'));
  });

  it('shows the server\'s sentence when it refuses, and stays signed in', async () => {
    const s = await setUp();
    await fillIn(s, 'secret-password', 'kit@example.org');
    await (await s.button()).click();
    const sentence = 'You are the only owner of the bench "Kelp garden", which has other members. Make another member owner (or delete the bench) first, then delete your account.';
    s.backend.expectOne('/api/auth/account').flush(
      { error: { code: 'LAST_OWNER', message: sentence } },
      { status: 409, statusText: 'Conflict' },
    );
    await vi.waitFor(async () => {
      await s.fixture.whenStable();
      expect(s.alertText()).toContain(sentence);
    });
    expect(s.alertText()).toContain('Your account was not deleted.');
    expect(s.auth.signedIn()).toBe(true);
    expect(s.navigate).not.toHaveBeenCalled();
    expect(await (await s.button()).isDisabled()).toBe(false);
  });

  it('puts a wrong-password answer on the password field without signing out', async () => {
    const s = await setUp();
    await fillIn(s, 'not-it', 'kit@example.org');
    await (await s.button()).click();
    s.backend.expectOne('/api/auth/account').flush(
      {
        error: {
          code: 'VALIDATION_FAILED',
          message: 'The password is wrong, so nothing was deleted. Type your current password again.',
          fields: { password: 'The password is wrong: type your current password again.' },
        },
      },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await vi.waitFor(async () => {
      expect(await (await s.field('Your password')).getTextErrors()).toEqual(['The password is wrong: type your current password again.']);
    });
    expect(s.auth.signedIn()).toBe(true);
    expect(s.navigate).not.toHaveBeenCalled();
    // The marked field must be typed again before the button comes back.
    expect(await (await s.button()).isDisabled()).toBe(true);
    await (await s.input('password')).setValue('secret-password');
    expect(await (await s.button()).isDisabled()).toBe(false);
  });
});
