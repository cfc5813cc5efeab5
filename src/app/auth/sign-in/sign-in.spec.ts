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
import { AuthStore } from '../../core/auth-store';
import { SignIn } from './sign-in';

async function setUp(inputs: Record<string, string> = {}) {
  localStorage.clear();
  TestBed.configureTestingModule({
    imports: [SignIn],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      provideHttpClient(withInterceptors([authTokenInterceptor, apiErrorInterceptor])),
      provideHttpClientTesting(),
    ],
  });
  const fixture = TestBed.createComponent(SignIn);
  for (const [name, value] of Object.entries(inputs)) fixture.componentRef.setInput(name, value);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const backend = TestBed.inject(HttpTestingController);
  await fixture.whenStable();
  return { fixture, loader, backend };
}

const field = (loader: Awaited<ReturnType<typeof setUp>>['loader'], label: string) =>
  loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));

describe('SignIn', () => {
  it('shows what to fix when the form is sent empty or with a malformed address, and sends nothing', async () => {
    const { loader, backend } = await setUp();
    backend.expectOne('/api/config').flush({ devMode: false, maxUploadBytes: 1 });
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }))).click();
    expect(await (await field(loader, 'E-mail')).getTextErrors()).toEqual(['Enter your e-mail address.']);
    expect(await (await field(loader, 'Password')).getTextErrors()).toEqual(['Enter your password.']);

    const email = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }));
    await email.setValue('not-an-address');
    await email.blur();
    expect(await (await field(loader, 'E-mail')).getTextErrors())
      .toEqual(['Enter a valid e-mail address, like name@example.org.']);
    backend.expectNone('/api/auth/signin');
  });

  it('prefills the e-mail from the link and shows the demo account in development', async () => {
    const { fixture, loader, backend } = await setUp({ email: 'invited@example.org' });
    backend.expectOne('/api/config').flush({
      devMode: true, demoSignIn: { email: 'demo@noisewright.local', password: 'workbench-demo' }, maxUploadBytes: 1,
    });
    await fixture.whenStable();
    const email = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }));
    expect(await email.getValue()).toBe('invited@example.org');
    const demoBox = (fixture.nativeElement as HTMLElement).querySelector('[data-testid=demo-sign-in]');
    expect(demoBox?.textContent).toContain('demo@noisewright.local');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Fill in the demo account' }))).click();
    expect(await email.getValue()).toBe('demo@noisewright.local');
  });

  it('signs in, stores the session and follows the return URL', async () => {
    const { loader, backend } = await setUp({ returnUrl: '/invite/tok-9' });
    backend.expectOne('/api/config').flush({ devMode: false, maxUploadBytes: 1 });
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigateByUrl').mockResolvedValue(true);
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue(' kit@example.org ');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue('secret-password');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }))).click();
    const req = backend.expectOne('/api/auth/signin');
    expect(req.request.body).toEqual({ email: 'kit@example.org', password: 'secret-password' });
    req.flush({ token: 'tok', user: { id: 'u1', email: 'kit@example.org', displayName: 'Kit', isAdmin: false, createdAt: '' } });
    await vi.waitFor(() => expect(navigate).toHaveBeenCalledWith('/invite/tok-9'));
    expect(TestBed.inject(AuthStore).signedIn()).toBe(true);
  });

  it('says what to do after a wrong password, and puts server field errors on the right field', async () => {
    const { fixture, loader, backend } = await setUp();
    backend.expectOne('/api/config').flush({ devMode: false, maxUploadBytes: 1 });
    const email = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }));
    await email.setValue('kit@example.org');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue('wrong-one');
    const submit = await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }));
    await submit.click();
    backend.expectOne('/api/auth/signin').flush(
      { error: { code: 'BAD_CREDENTIALS', message: 'E-mail or password is wrong.' } },
      { status: 401, statusText: 'Unauthorized' },
    );
    await vi.waitFor(async () => {
      await fixture.whenStable();
      const alert = (fixture.nativeElement as HTMLElement).querySelector('[role=alert]');
      expect(alert?.textContent).toContain('E-mail or password is wrong. Check both and try again');
    });
    expect(TestBed.inject(AuthStore).signedIn()).toBe(false);

    await submit.click();
    backend.expectOne('/api/auth/signin').flush(
      { error: { code: 'VALIDATION_FAILED', message: 'Some fields are not valid.', fields: { email: 'Use an e-mail address of at most 254 characters.' } } },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await vi.waitFor(async () => {
      expect(await (await field(loader, 'E-mail')).getTextErrors()).toEqual(['Use an e-mail address of at most 254 characters.']);
    });
  });
});
