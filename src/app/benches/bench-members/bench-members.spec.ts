import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import { BenchSummary, Member, Role } from '../../core/api-types';
import { apiErrorInterceptor, authTokenInterceptor } from '../../core/auth-interceptors';
import { AuthStore } from '../../core/auth-store';
import { BenchMembers } from './bench-members';

const people: Member[] = [
  { userId: 'u-owner', email: 'olga@example.org', displayName: 'Olga', role: 'owner', joinedAt: '2026-01-01T00:00:00Z' },
  { userId: 'u-coach', email: 'carl@example.org', displayName: 'Carl', role: 'coach', joinedAt: '2026-01-02T00:00:00Z' },
  { userId: 'u-member', email: 'mia@example.org', displayName: 'Mia', role: 'member', joinedAt: '2026-01-03T00:00:00Z' },
];

async function setUp(myRole: Role, myId: string) {
  localStorage.clear();
  TestBed.configureTestingModule({
    imports: [BenchMembers],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      provideHttpClient(withInterceptors([authTokenInterceptor, apiErrorInterceptor])),
      provideHttpClientTesting(),
    ],
  });
  const backend = TestBed.inject(HttpTestingController);
  const signedIn = TestBed.inject(AuthStore).signIn('me@example.org', 'secret-password');
  backend.expectOne('/api/auth/signin').flush({
    token: 't', user: { id: myId, email: 'me@example.org', displayName: 'Me', isAdmin: false, createdAt: '' },
  });
  await signedIn;
  const fixture = TestBed.createComponent(BenchMembers);
  const bench: BenchSummary = { id: 'b1', name: 'Lab', description: '', role: myRole, memberCount: 3, createdAt: '' };
  fixture.componentRef.setInput('bench', bench);
  fixture.detectChanges();
  backend.expectOne('/api/benches/b1/members').flush(people);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  await vi.waitFor(async () => {
    await fixture.whenStable();
    expect(await (await loader.getHarness(MatTableHarness)).getRows()).toHaveLength(3);
  });
  return { fixture, backend, loader };
}

describe('BenchMembers', () => {
  it('gives a coach a role picker only for members and viewers, and a remove button only for them and for leaving', async () => {
    const { loader } = await setUp('coach', 'u-coach');
    const selects = await loader.getAllHarnesses(MatSelectHarness);
    expect(selects).toHaveLength(1);
    expect(await selects[0].getValueText()).toBe('Member');
    await selects[0].open();
    expect(await Promise.all((await selects[0].getOptions()).map((o) => o.getText()))).toEqual(['Member', 'Viewer']);
    const buttons = await Promise.all((await loader.getAllHarnesses(MatButtonHarness)).map((b) => b.getText()));
    expect(buttons).toEqual(['Leave', 'Remove']);
  });

  it('sends a role change and reloads the list', async () => {
    const { backend, loader } = await setUp('owner', 'u-owner');
    const selects = await loader.getAllHarnesses(MatSelectHarness);
    expect(selects).toHaveLength(3);
    await selects[2].open();
    await selects[2].clickOptions({ text: 'Viewer' });
    const patch = backend.expectOne({ method: 'PATCH', url: '/api/benches/b1/members/u-member' });
    expect(patch.request.body).toEqual({ role: 'viewer' });
    patch.flush({});
    await vi.waitFor(() => backend.expectOne('/api/benches/b1/members').flush(people));
  });

  it('shows why a refused role change did not happen', async () => {
    const { fixture, backend, loader } = await setUp('owner', 'u-owner');
    const selects = await loader.getAllHarnesses(MatSelectHarness);
    await selects[0].open();
    await selects[0].clickOptions({ text: 'Member' });
    backend.expectOne({ method: 'PATCH', url: '/api/benches/b1/members/u-owner' }).flush(
      { error: { code: 'LAST_OWNER', message: 'A bench needs at least one owner: make someone else owner first.' } },
      { status: 409, statusText: 'Conflict' },
    );
    await vi.waitFor(() => backend.expectOne('/api/benches/b1/members').flush(people));
    await vi.waitFor(async () => {
      await fixture.whenStable();
      const alert = (fixture.nativeElement as HTMLElement).querySelector('[role=alert]');
      expect(alert?.textContent).toContain('The role of Olga did not change. A bench needs at least one owner');
    });
  });
});
