import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { RunnerDto, RunnersOverview } from '../../../../shared/api/runners';
import { ApiError } from '../../core/api-error';
import { RunnersApi } from '../runners-api';
import { agoText, RunnersPage } from './runners-page';
import { runnerCommand } from './new-runner-dialog';

const NOW = Date.parse('2026-12-05T09:00:00Z');
const runner = (over: Partial<RunnerDto>): RunnerDto => ({
  id: 'r-emb', name: 'This server', kind: 'embedded', createdAt: '2026-12-01T00:00:00Z', revokedAt: null,
  lastHeartbeatAt: new Date(NOW - 12_000).toISOString(), online: true, threads: 1, currentJobs: [], currentEvaluations: [], stepsPerSecond: null, jobsDone: 0, ...over,
});
const OVERVIEW: RunnersOverview = {
  backend: 'embedded',
  queue: { waiting: 3, active: 1, evaluationsWaiting: 0 },
  runners: [
    runner({ currentJobs: [{ runId: 'run-1', runName: 'Cell 1', benchId: 'b1', benchName: 'Lab', step: 40, steps: 80, stepsPerSecond: 2.5 }], stepsPerSecond: 2.5, jobsDone: 7 }),
    runner({ id: 'r-box', name: 'box-2', kind: 'remote', lastHeartbeatAt: null, online: false, threads: null }),
  ],
};

async function setUp(api: Partial<Record<keyof RunnersApi, unknown>>) {
  vi.useFakeTimers({ toFake: ['Date'] });
  vi.setSystemTime(NOW);
  TestBed.configureTestingModule({
    imports: [RunnersPage],
    providers: [provideZonelessChangeDetection(), provideRouter([]), { provide: RunnersApi, useValue: api }],
  });
  const fixture = TestBed.createComponent(RunnersPage);
  await fixture.whenStable();
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const root = TestbedHarnessEnvironment.documentRootLoader(fixture);
  const text = (id: string) => ((fixture.nativeElement as HTMLElement).querySelector(`[data-testid=${id}]`)?.textContent ?? '').replace(/\s+/g, ' ').trim();
  const page = () => ((fixture.nativeElement as HTMLElement).textContent ?? '').replace(/\s+/g, ' ');
  return { fixture, loader, root, text, page };
}

describe('RunnersPage', { timeout: 30_000 }, () => {
  afterEach(() => { vi.useRealTimers(); TestBed.resetTestingModule(); });

  it('lists runners with heartbeat, jobs, speed and the queue', async () => {
    const { loader, text } = await setUp({ overview: vi.fn(async () => OVERVIEW) });
    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByIndex();
    expect(rows[0]).toEqual(['This server server threads', 'online', '12 s ago', '1', expect.stringMatching(/^Cell 1\s*on Lab\s*40 \/ 80$/), '2.5', '7', '']);
    expect(rows[1]).toEqual(['box-2 remote', 'offline', 'never', '—', 'idle', '—', '0', 'Revoke']);
    expect(text('queue-waiting')).toBe('3');
    expect(text('queue-active')).toBe('1');
    expect(text('queue-line')).toBe('3 runs waiting · 1 being trained');
    expect(text('backend')).toMatch(/^Embedded/);
  });

  it('counts evaluation requests waiting for a runner beside the runs, singular and plural', async () => {
    const lineFor = async (queue: RunnersOverview['queue']) => {
      const { text } = await setUp({ overview: vi.fn(async () => ({ ...OVERVIEW, queue })) });
      const line = text('queue-line');
      TestBed.resetTestingModule();
      return line;
    };
    expect(await lineFor({ waiting: 2, active: 1, evaluationsWaiting: 1 })).toBe('2 runs and 1 evaluation waiting · 1 being trained');
    expect(await lineFor({ waiting: 1, active: 0, evaluationsWaiting: 3 })).toBe('1 run and 3 evaluations waiting · 0 being trained');
    expect(await lineFor({ waiting: 0, active: 2, evaluationsWaiting: 1 })).toBe('1 evaluation waiting · 2 being trained');
    expect(await lineFor({ waiting: 0, active: 0, evaluationsWaiting: 0 })).toBe('0 runs waiting · 0 being trained');
  });

  it('shows an evaluation a runner computes as one of its current jobs, with its stage', async () => {
    const evaluating = runner({
      currentEvaluations: [{ requestId: 'q1', runId: 'run-2', runName: 'Tea model', benchId: 'b1', benchName: 'Lab', checkpointStep: 300, stage: { done: 2, total: 5, next: 'noise draws' } }],
    });
    const { loader } = await setUp({ overview: vi.fn(async () => ({ ...OVERVIEW, runners: [evaluating] })) });
    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByIndex();
    expect(rows[0]![4]).toMatch(/^evaluating\s*Tea model\s*step 300 on Lab\s*noise draws \(2 of 5\)$/);
  });

  it('creates a token and shows it once with the command line', async () => {
    const create = vi.fn(async (name: string) => ({ runner: runner({ id: 'r-new', name, kind: 'remote' }), token: 'nwr_abc' }));
    const { loader, root } = await setUp({ overview: vi.fn(async () => OVERVIEW), create });
    await (await loader.getHarness(MatButtonHarness.with({ text: /New runner token/ }))).click();
    const dialog = await root.getHarness(MatDialogHarness);
    // An empty name is refused in the dialog, with a sentence, and nothing is sent.
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Create token' }))).click();
    expect(await dialog.getText()).toContain('Name the runner');
    expect(create).not.toHaveBeenCalled();
    await (await dialog.getHarness(MatInputHarness)).setValue('  box-3 ');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Create token' }))).click();
    expect(create).toHaveBeenCalledWith('box-3');
    const shown = await dialog.getText();
    expect(shown).toContain('nwr_abc');
    expect(shown).toContain(`npm run runner -- --server ${location.origin} --token nwr_abc`);
    expect(shown).toContain('only now');
    expect(await dialog.getAllHarnesses(MatButtonHarness.with({ selector: '[aria-label="Copy the token"]' }))).toHaveLength(1);
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Done' }))).click();
  });

  it('revokes a token only after confirmation', async () => {
    const revoke = vi.fn(async () => undefined);
    const { loader, root } = await setUp({ overview: vi.fn(async () => OVERVIEW), revoke });
    const button = await loader.getHarness(MatButtonHarness.with({ text: 'Revoke' }));
    await button.click();
    let confirm = await root.getHarness(MatDialogHarness);
    expect(await confirm.getTitleText()).toBe('Revoke the token of box-2?');
    await (await confirm.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    expect(revoke).not.toHaveBeenCalled();
    await button.click();
    confirm = await root.getHarness(MatDialogHarness);
    await (await confirm.getHarness(MatButtonHarness.with({ text: 'Revoke' }))).click();
    await vi.waitFor(() => expect(revoke).toHaveBeenCalledWith('r-box'));
  });

  it('says what went wrong when the runners cannot be loaded', async () => {
    const { page } = await setUp({ overview: vi.fn(async () => { throw new ApiError(403, 'FORBIDDEN', 'Only the instance admin manages runners.'); }) });
    expect(page()).toContain('The runners could not be loaded. Only the instance admin manages runners.');
  });
});

describe('agoText and runnerCommand', () => {
  it('formats heartbeat ages', () => {
    const t = Date.parse('2026-12-05T09:00:00Z');
    expect(agoText('2026-12-05T08:59:48Z', t)).toBe('12 s ago');
    expect(agoText('2026-12-05T08:55:00Z', t)).toBe('5 min ago');
    expect(agoText('2026-12-05T06:00:00Z', t)).toBe('3 h ago');
    expect(agoText(null, t)).toBe('never');
  });

  it('adds the queue option for the BullMQ back-end', () => {
    expect(runnerCommand('http://h:4300', 'nwr_x', 'embedded')).toBe('npm run runner -- --server http://h:4300 --token nwr_x');
    expect(runnerCommand('http://h:4300', 'nwr_x', 'bullmq')).toContain('--queue ');
  });
});
