import { provideHttpClient } from '@angular/common/http';
import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { provideRouter } from '@angular/router';
import type { EvaluationRequestDto } from '../../../../shared/api/evaluation-jobs';
import type { CreateEvaluationRequest, EvaluationDto, EvaluationSettingsInput, EvaluationSummaryDto } from '../../../../shared/api/evaluations';
import type { RunDto } from '../../../../shared/api/runs';
import { CurrentBench } from '../../benches/current-bench';
import { RunnersApi } from '../../runners/runners-api';
import { RunsApi } from '../../runs/runs-api';
import type { EvaluationJobInput, EvaluationJobResult } from '../../workers/evaluator-api';
import { EVALUATOR_FACTORY } from '../../workers/evaluator-client';
import { EvaluationsApi } from '../evaluations-api';
import { EvaluationPage } from './evaluation-page';

const BENCH = 'b1';
const RUN_ID = '6a0c3c1e-2f41-4f3a-8a1e-5d2b9c7e4f10';
const CHECKPOINT_ID = '9d4e1f2a-3b5c-4d6e-8f70-1a2b3c4d5e6f';

const run = {
  id: RUN_ID, benchId: BENCH, corpus: { id: 'c1', name: 'Syllables' }, createdBy: null, name: 'gru-small', family: 'gru',
  settings: { model: { stateSize: 8 }, training: {} }, alphabet: ['a', 'k'], status: 'stopped', statusReason: null, summary: {},
  stepsDone: 40, archived: false, checkpointCount: 1, canControl: true, placement: 'tab', runner: null, live: null, createdAt: '2026-12-01T00:00:00Z', updatedAt: '2026-12-01T00:00:00Z',
} as unknown as RunDto;

/** Invented figures in the shape `evaluateExact` gives (the page only shows them; none is an expected result). */
function results(order: number): EvaluationJobResult {
  const ce = { crossEntropyBits: 9, dataEntropyBits: 8, klGapBits: 1, modelMass: 0.5 };
  return {
    family: 'gru', heldOut: { bitsPerWord: 10, bitsPerChar: 2.5, words: 4 }, crossEntropy: ce,
    baselines: { unigram: { bitsPerWord: 12, bitsPerChar: 3, words: 4 }, ngram: { bitsPerWord: 11, bitsPerChar: 2.75, words: 4, order, crossEntropy: ce } },
  } as EvaluationJobResult;
}

function dto(settings: EvaluationSummaryDto['settings'], id: string): EvaluationDto {
  return {
    id, benchId: BENCH, run: { id: RUN_ID, name: run.name, family: 'gru' }, checkpoint: { id: CHECKPOINT_ID, step: 40 }, createdBy: null,
    settings, headline: { bitsPerChar: 2.5, bitsPerWord: 10, crossEntropyBits: 9 }, createdAt: '2026-12-02T00:00:00Z',
    results: results(settings.ngramOrder ?? 3),
  };
}

/** A runner evaluation as the server answers it (waiting, running, finished). */
function requestDto(status: EvaluationRequestDto['status'], extra: Partial<EvaluationRequestDto> = {}): EvaluationRequestDto {
  return {
    id: 'q1', benchId: BENCH, runId: RUN_ID, checkpoint: { id: CHECKPOINT_ID, step: 40 }, settings: dto({ K: 256, seed: 1 } as EvaluationDto['settings'], 'x').settings,
    status, statusReason: null, runnerName: status === 'running' ? 'Attic box' : null, stage: status === 'running' ? { done: 2, total: 8, next: 'noise draws' } : null,
    evaluationId: null, createdBy: null, createdAt: '2026-12-02T00:00:00Z', updatedAt: '2026-12-02T00:00:00Z', ...extra,
  };
}

async function setUp(stored: EvaluationDto[] = [], hang = false, onlineRunners = 0, states: EvaluationRequestDto[] = []) {
  const evaluate = vi.fn(async (input: EvaluationJobInput) =>
    hang ? new Promise<EvaluationJobResult>(() => undefined) : results(input.ngramOrder));
  const close = vi.fn();
  const saved: EvaluationDto[] = [...stored];
  let sent = requestDto('waiting');
  const sendRequest = vi.fn(async (_b: string, _r: string, _c: string, settings: EvaluationSettingsInput) => {
    sent = requestDto('waiting', { settings: { ...sent.settings, ...settings } as EvaluationDto['settings'] });
    return sent;
  });
  const withdrawRequest = vi.fn(async () => undefined);
  const create = vi.fn(async (_b: string, _r: string, _c: string, body: CreateEvaluationRequest) => {
    const e = dto(body.settings as EvaluationDto['settings'], `e${saved.length + 1}`);
    saved.unshift(e);
    return e;
  });
  TestBed.configureTestingModule({
    imports: [EvaluationPage],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      provideHttpClient(),
      { provide: CurrentBench, useValue: { current: signal({ id: BENCH, name: 'Bench', role: 'owner' }), open: async () => null } },
      {
        provide: RunsApi,
        useValue: {
          get: async () => run,
          checkpoints: async () => [{ id: CHECKPOINT_ID, step: 40 }],
          list: async () => ({ items: [], total: 0 }),
          downloadCheckpoint: async () => new Uint8Array([1, 2, 3]),
          trainingSet: async () => ({ alphabet: ['a', 'k'], words: ['ka', 'ak', 'kak'], counts: [3, 2, 1], splits: ['train', 'validation', 'test'] }),
        },
      },
      {
        provide: EvaluationsApi,
        useValue: {
          list: async () => saved.slice(), get: async (_b: string, id: string) => saved.find((e) => e.id === id)!, create,
          requests: async () => [], request: sendRequest, withdrawRequest, requestState: async () => {
            const next = { ...states.shift()!, settings: sent.settings };
            if (next.status === 'finished') saved.unshift(dto(next.settings, next.evaluationId!));
            return next;
          },
        },
      },
      {
        provide: RunnersApi,
        useValue: { availability: async () => ({ backend: 'embedded', onlineRunners, onlineThreads: onlineRunners, waiting: 0, active: 0, canSend: true }) },
      },
      { provide: EVALUATOR_FACTORY, useValue: () => ({ api: { evaluate }, close }) },
    ],
  });
  const fixture = TestBed.createComponent(EvaluationPage);
  fixture.componentRef.setInput('benchId', BENCH);
  fixture.componentRef.setInput('runId', RUN_ID);
  fixture.componentRef.setInput('checkpointId', CHECKPOINT_ID);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  await fixture.whenStable();
  // The page loads the run, its checkpoints and the stored evaluations before it shows the form.
  await vi.waitFor(() => expect((fixture.nativeElement as HTMLElement).querySelector('nw-evaluation-settings')).not.toBeNull());
  await fixture.whenStable();
  return { fixture, loader, evaluate, create, close, sendRequest, withdrawRequest };
}

type Setup = Awaited<ReturnType<typeof setUp>>;
const text = (fixture: Setup['fixture'], id: string) =>
  ((fixture.nativeElement as HTMLElement).querySelector(`[data-testid=${id}]`)?.textContent ?? '').replace(/\s+/g, ' ').trim();

async function choose(loader: Setup['loader'], split: string | null, order: string | null): Promise<void> {
  if (split) {
    const select = await loader.getHarness(MatSelectHarness.with({ selector: '[data-testid=held-out-split]' }));
    await select.open();
    await select.clickOptions({ text: split });
  }
  if (order) await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=ngramOrder]' }))).setValue(order);
  await (await loader.getHarness(MatButtonHarness.with({ text: /Evaluate/ }))).click();
}

describe('Evaluation page settings → worker', { timeout: 30_000 }, () => {
  it('sends the chosen order 5 and split validation to the worker, and stores them with the figures', async () => {
    const { fixture, loader, evaluate, create } = await setUp();
    await choose(loader, 'Validation', '5');
    await vi.waitFor(() => expect(create).toHaveBeenCalledTimes(1));
    expect(evaluate).toHaveBeenCalledTimes(1);
    const input = evaluate.mock.calls[0]![0];
    expect(input.heldOutSplit).toBe('validation');
    expect(input.ngramOrder).toBe(5);
    expect(input.split).toBeNull();
    expect(create.mock.calls[0]![3].settings).toMatchObject({ heldOutSplit: 'validation', ngramOrder: 5 });
    await fixture.whenStable();
    expect(text(fixture, 'shown-settings')).toBe('validation split, Kneser–Ney order 5,');
  });

  it('keeps the defaults test and order 3 when nothing is changed', async () => {
    const { loader, evaluate, create } = await setUp();
    await choose(loader, null, null);
    await vi.waitFor(() => expect(create).toHaveBeenCalledTimes(1));
    expect(evaluate.mock.calls[0]![0]).toMatchObject({ heldOutSplit: 'test', ngramOrder: 3 });
  });

  it('shows an evaluation stored before these settings existed for the defaults, but computes anew for order 4', async () => {
    // Stored settings of an older evaluation: no heldOutSplit and no ngramOrder (computed with test and 3).
    const old = dto({ K: 256, repeats: 3, S: 1024, crossEntropyK: 16, M: 64, sampleCount: 1000, detailWords: 100, maxHeldOut: 500, tMax: 24,
      particles: 512, prefixes: [], seed: 1, baselineRunId: null } as unknown as EvaluationDto['settings'], 'old');
    const { fixture, loader, evaluate, create } = await setUp([old]);
    await choose(loader, null, null);
    await fixture.whenStable();
    expect(text(fixture, 'evaluation-notice')).toMatch(/exactly these settings is stored already/);
    expect(evaluate).not.toHaveBeenCalled();
    await choose(loader, null, '4');
    await vi.waitFor(() => expect(create).toHaveBeenCalledTimes(1));
    expect(evaluate.mock.calls[0]![0]).toMatchObject({ heldOutSplit: 'test', ngramOrder: 4 });
  });

  it('names no K, repeats, S or M for an exact model (this run is a GRU), but its seed and sample count', async () => {
    const stored = dto({ K: 256, repeats: 3, S: 1024, M: 64, sampleCount: 1000, seed: 7, heldOutSplit: 'test', ngramOrder: 3 } as unknown as EvaluationDto['settings'], 'g1');
    const { fixture } = await setUp([stored]);
    const chip = text(fixture, 'stored-evaluations');
    expect(chip).toContain('seed 7');
    expect(chip).not.toMatch(/\bK \d/);
    await ((fixture.nativeElement as HTMLElement).querySelector('[data-testid=stored-evaluations] button') as HTMLButtonElement).click();
    await fixture.whenStable();
    const head = ((fixture.nativeElement as HTMLElement).querySelector('.result-head')?.textContent ?? '').replace(/\s+/g, ' ');
    expect(head).toContain('order 3, 1000 samples, seed 7');
    expect(head).not.toMatch(/\bK \d|repeats|\bS \d|\bM \d/);
  });
});

describe('Evaluation page cancel', { timeout: 30_000 }, () => {
  it('ends a running evaluation: the worker is terminated, nothing is stored and the page says so', async () => {
    const { fixture, loader, evaluate, create, close } = await setUp([], true);
    await choose(loader, null, null);
    await vi.waitFor(() => expect(evaluate).toHaveBeenCalledTimes(1));
    await fixture.whenStable();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Cancel/ }))).click();
    await vi.waitFor(() => expect(text(fixture, 'evaluation-notice')).toMatch(/cancelled; nothing was stored/));
    expect(close).toHaveBeenCalled();
    expect(create).not.toHaveBeenCalled();
    expect(text(fixture, 'evaluation-progress')).toBe('');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Cancel/ }))).toHaveLength(0);
  });
});

describe('Evaluation page on runners', { timeout: 30_000 }, () => {
  it('sends the evaluation to the runners when one is online, shows it waiting and running, then the figures it stored', async () => {
    const states = [requestDto('running'), requestDto('finished', { evaluationId: 'r1' })];
    const { fixture, loader, evaluate, create, sendRequest } = await setUp([], false, 1, states);
    await vi.waitFor(() => expect(text(fixture, 'placement-explanation')).toMatch(/A runner computes the figures/));
    await choose(loader, null, '4');
    await vi.waitFor(() => expect(sendRequest).toHaveBeenCalledTimes(1));
    expect(sendRequest.mock.calls[0]![3]).toMatchObject({ heldOutSplit: 'test', ngramOrder: 4 });
    await fixture.whenStable();
    expect(text(fixture, 'runner-evaluation')).toMatch(/Waiting for a runner/);
    await vi.waitFor(() => expect(text(fixture, 'runner-evaluation')).toMatch(/Attic box computes noise draws \(2 of 8 done\)/), { timeout: 5000 });
    await vi.waitFor(() => expect(text(fixture, 'evaluation-notice')).toMatch(/A runner stored these figures/), { timeout: 5000 });
    await fixture.whenStable();
    expect(text(fixture, 'shown-settings')).toBe('test split, Kneser–Ney order 4,');
    expect(text(fixture, 'runner-evaluation')).toBe('');
    expect(evaluate).not.toHaveBeenCalled();
    expect(create).not.toHaveBeenCalled();
  });

  it('withdraws a runner evaluation that still waits: the request goes, the page says so and stops following it', async () => {
    const { fixture, loader, sendRequest, withdrawRequest } = await setUp([], false, 1, [requestDto('waiting'), requestDto('waiting')]);
    await vi.waitFor(() => expect(text(fixture, 'placement-explanation')).toMatch(/A runner computes the figures/));
    await choose(loader, null, null);
    await vi.waitFor(() => expect(sendRequest).toHaveBeenCalledTimes(1));
    await fixture.whenStable();
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[data-testid=withdraw-request]' }))).click();
    await vi.waitFor(() => expect(withdrawRequest).toHaveBeenCalledWith(BENCH, 'q1'));
    await fixture.whenStable();
    expect(text(fixture, 'runner-evaluation')).toBe('');
    expect(text(fixture, 'evaluation-notice')).toMatch(/withdrawn; no runner will compute it/);
  });

  it('keeps the evaluation in the tab while no runner is online', async () => {
    const { fixture, loader, evaluate, sendRequest } = await setUp([], false, 0);
    await vi.waitFor(() => expect(text(fixture, 'placement-explanation')).toMatch(/No runner is online now/));
    await choose(loader, null, null);
    await vi.waitFor(() => expect(evaluate).toHaveBeenCalledTimes(1));
    expect(sendRequest).not.toHaveBeenCalled();
  });
});
