import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { BenchAreaPlaceholder } from '../../ui/bench-area-placeholder/bench-area-placeholder';

/** Landing page of the comparison area (replaced when comparisons ship). */
@Component({
  selector: 'nw-compare-home',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [BenchAreaPlaceholder],
  template: `<nw-bench-area-placeholder [benchId]="benchId()" title="Compare" [purpose]="purpose" [upcoming]="upcoming" />`,
})
export class CompareHome {
  readonly benchId = input.required<string>();
  protected readonly purpose = 'Side-by-side comparison of finished runs of this bench, and grids over settings.';
  protected readonly upcoming = [
    'A table of runs with their figures in bits per word, and overlaid training curves.',
    'Grids over settings (flows, state sizes, seeds) run as a queue, with a heat map.',
    'A report to export as CSV / JSON or print, and the one-click learnability check.',
  ];
}
