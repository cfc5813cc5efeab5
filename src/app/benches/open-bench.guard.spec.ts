import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { convertToParamMap, type ActivatedRouteSnapshot, type RouterStateSnapshot } from '@angular/router';
import { CurrentBench } from './current-bench';
import { openBenchGuard } from './open-bench.guard';

function run(benchId: string, currentId: string | null) {
  const open = vi.fn(async () => null);
  TestBed.configureTestingModule({
    providers: [provideZonelessChangeDetection(), { provide: CurrentBench, useValue: { current: signal(currentId ? { id: currentId } : null), open } }],
  });
  const route = { paramMap: convertToParamMap({ benchId }) } as ActivatedRouteSnapshot;
  const result = TestBed.runInInjectionContext(() => openBenchGuard(route, {} as RouterStateSnapshot));
  return { result, open };
}

describe('openBenchGuard', () => {
  it('opens the bench of the route when another one (or none) is current, without blocking', () => {
    const { result, open } = run('b2', 'b1');
    expect(result).toBe(true);
    expect(open).toHaveBeenCalledWith('b2');
  });

  it('leaves the current bench alone when it is the route’s', () => {
    const { result, open } = run('b1', 'b1');
    expect(result).toBe(true);
    expect(open).not.toHaveBeenCalled();
  });
});
