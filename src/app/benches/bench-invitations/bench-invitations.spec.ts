import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { BenchSummary, Role } from '../../core/api-types';
import { apiErrorInterceptor, authTokenInterceptor } from '../../core/auth-interceptors';
import { BenchInvitations } from './bench-invitations';

async function setUp(role: Role) {
  TestBed.configureTestingModule({
    imports: [BenchInvitations],
    providers: [
      provideZonelessChangeDetection(),
      provideHttpClient(withInterceptors([authTokenInterceptor, apiErrorInterceptor])),
      provideHttpClientTesting(),
    ],
  });
  const fixture = TestBed.createComponent(BenchInvitations);
  const bench: BenchSummary = { id: 'b1', name: 'Lab', description: '', role, memberCount: 2, createdAt: '' };
  fixture.componentRef.setInput('bench', bench);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const backend = TestBed.inject(HttpTestingController);
  await fixture.whenStable();
  backend.expectOne('/api/benches/b1/invitations').flush([]);
  await fixture.whenStable();
  return { fixture, loader, backend };
}

describe('BenchInvitations', () => {
  it('offers a coach every role but owner (only owners invite owners)', async () => {
    const { loader } = await setUp('coach');
    const select = await loader.getHarness(MatSelectHarness);
    await select.open();
    const options = await Promise.all((await select.getOptions()).map((o) => o.getText()));
    expect(options).toEqual(['Coach', 'Member', 'Viewer']);
  });

  it('offers an owner all four roles', async () => {
    const { loader } = await setUp('owner');
    const select = await loader.getHarness(MatSelectHarness);
    await select.open();
    const options = await Promise.all((await select.getOptions()).map((o) => o.getText()));
    expect(options).toEqual(['Owner', 'Coach', 'Member', 'Viewer']);
  });

  it('refuses a role the inviter may not hand out, with a message saying which roles are allowed', async () => {
    const { fixture, loader, backend } = await setUp('coach');
    const component = fixture.componentInstance as unknown as { form: { controls: { role: { setValue(v: string): void; markAsTouched(): void } } } };
    component.form.controls.role.setValue('owner');
    component.form.controls.role.markAsTouched();
    await (await loader.getHarness(MatInputHarness)).setValue('sam@example.org');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Send invitation/ }))).click();
    const roleField = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Role' }));
    expect(await roleField.getTextErrors())
      .toEqual(['You are coach here, so you cannot invite someone as owner. Choose one of: coach, member, viewer.']);
    backend.expectNone('/api/benches/b1/invitations');
  });

  it('sends the invitation with the chosen role, then lists it as pending', async () => {
    const { fixture, loader, backend } = await setUp('owner');
    await (await loader.getHarness(MatInputHarness)).setValue('sam@example.org');
    const select = await loader.getHarness(MatSelectHarness);
    await select.open();
    await select.clickOptions({ text: 'Viewer' });
    await (await loader.getHarness(MatButtonHarness.with({ text: /Send invitation/ }))).click();
    const post = backend.expectOne({ method: 'POST', url: '/api/benches/b1/invitations' });
    expect(post.request.body).toEqual({ email: 'sam@example.org', role: 'viewer' });
    const invitation = { id: 'i1', email: 'sam@example.org', role: 'viewer', invitedBy: 'Kit', createdAt: '', expiresAt: '2026-12-09T10:00:00Z' };
    post.flush(invitation, { status: 201, statusText: 'Created' });
    await vi.waitFor(() => backend.expectOne({ method: 'GET', url: '/api/benches/b1/invitations' }).flush([invitation]));
    await vi.waitFor(async () => {
      await fixture.whenStable();
      const cells = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
      expect(cells['email'].text).toEqual(['sam@example.org']);
      expect(cells['role'].text).toEqual(['Viewer']);
    });
    // The role field keeps the chosen role for the next invitation; only the address is cleared.
    expect(await select.getValueText()).toBe('Viewer');
    expect(await (await loader.getHarness(MatInputHarness)).getValue()).toBe('');
  });

  it('shows the server refusal on the e-mail field and a sentence above the form', async () => {
    const { fixture, loader, backend } = await setUp('owner');
    await (await loader.getHarness(MatInputHarness)).setValue('kit@example.org');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Send invitation/ }))).click();
    backend.expectOne({ method: 'POST', url: '/api/benches/b1/invitations' }).flush(
      { error: { code: 'VALIDATION_FAILED', message: 'Some fields are not valid.', fields: { email: 'This person is already a member of the bench.' } } },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await vi.waitFor(async () => {
      await fixture.whenStable();
      const emailField = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'E-mail' }));
      expect(await emailField.getTextErrors()).toEqual(['This person is already a member of the bench.']);
    });
    const alert = (fixture.nativeElement as HTMLElement).querySelector('[role=alert]');
    expect(alert?.textContent).toContain('No invitation was sent. Correct the marked field and try again.');
  });
});
