import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSnackBarHarness } from '@angular/material/snack-bar/testing';
import { provideRouter } from '@angular/router';
import { apiErrorInterceptor, authTokenInterceptor } from '../../core/auth-interceptors';
import { SignUp } from './sign-up';

async function setUp() {
  localStorage.clear();
  TestBed.configureTestingModule({
    imports: [SignUp],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      provideHttpClient(withInterceptors([authTokenInterceptor, apiErrorInterceptor])),
      provideHttpClientTesting(),
    ],
  });
  const fixture = TestBed.createComponent(SignUp);
  fixture.componentRef.setInput('email', 'sam@example.org');
  const loader = TestbedHarnessEnvironment.loader(fixture);
  await fixture.whenStable();
  const input = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
  const errors = async (label: string) =>
    (await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }))).getTextErrors();
  return { fixture, loader, backend: TestBed.inject(HttpTestingController), input, errors };
}

describe('SignUp', () => {
  it('checks name, password length and the repeated password before sending anything', async () => {
    const { loader, backend, input, errors } = await setUp();
    expect(await (await input('email')).getValue()).toBe('sam@example.org');
    await (await input('displayName')).setValue('   ');
    await (await input('password')).setValue('short');
    await (await input('confirm')).setValue('shorter');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create account' }))).click();
    expect(await errors('Your name')).toEqual(['Enter your name (not only spaces).']);
    expect(await errors('Password')).toEqual(['Use at least 8 characters.']);
    expect(await errors('Password again')).toEqual(['The two passwords differ. Type the same password twice.']);
    backend.expectNone('/api/auth/signup');
  });

  it('marks the e-mail field when an account with that address exists', async () => {
    const { fixture, loader, backend, input, errors } = await setUp();
    await (await input('displayName')).setValue('Sam');
    await (await input('password')).setValue('long-enough-1');
    await (await input('confirm')).setValue('long-enough-1');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create account' }))).click();
    const req = backend.expectOne('/api/auth/signup');
    expect(req.request.body).toEqual({ email: 'sam@example.org', password: 'long-enough-1', displayName: 'Sam' });
    req.flush(
      { error: { code: 'EMAIL_TAKEN', message: 'An account with this e-mail address exists already. Sign in, or reset the password.' } },
      { status: 409, statusText: 'Conflict' },
    );
    await vi.waitFor(async () => {
      await fixture.whenStable();
      expect(await errors('E-mail')).toEqual(['An account with this e-mail exists. Sign in instead.']);
    });
    const alert = (fixture.nativeElement as HTMLElement).querySelector('[role=alert]');
    expect(alert?.textContent).toContain('Sign in, or reset the password.');
  });

  it('asks production servers for the admin setup code, sends it, and says when it was not accepted', async () => {
    const { fixture, loader, backend, input } = await setUp();
    backend.expectOne('/api/config').flush({ devMode: false, maxUploadBytes: 1 });
    await fixture.whenStable();
    await (await input('displayName')).setValue('Sam');
    await (await input('password')).setValue('long-enough-1');
    await (await input('confirm')).setValue('long-enough-1');
    await (await input('setupCode')).setValue('  mistyped-code ');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create account' }))).click();
    const req = backend.expectOne('/api/auth/signup');
    expect(req.request.body).toEqual({ email: 'sam@example.org', password: 'long-enough-1', displayName: 'Sam', setupCode: 'mistyped-code' });
    req.flush({ token: 't', user: { id: 'u1', email: 'sam@example.org', displayName: 'Sam', isAdmin: false } }, { status: 201, statusText: 'Created' });
    const page = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await vi.waitFor(async () => {
      const bar = await page.getHarness(MatSnackBarHarness);
      expect(await bar.getMessage()).toContain('not as the admin: the setup code was not accepted');
    });
  });

  it('shows no setup-code field on a development server (its first account is the admin anyway)', async () => {
    const { fixture, loader, backend } = await setUp();
    backend.expectOne('/api/config').flush({ devMode: true, maxUploadBytes: 1 });
    await fixture.whenStable();
    expect(await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=setupCode]' }))).toHaveLength(0);
    expect(await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=password]' }))).toHaveLength(1);
  });
});
