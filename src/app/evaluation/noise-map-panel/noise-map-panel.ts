import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { NoiseMap } from '../../../../shared/eval/noise-map';
import { EvaluationWorker } from '../evaluation-worker';
import { UNSURE_BELOW, mapCells } from './noise-map-cells';

const STEPS = 21;
const RANGE = 3;

/** The noise plane at the state after a prefix, mapped through the generative flow: a grid of coloured cells. */
@Component({
  selector: 'nw-noise-map-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [FormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, MatSelectModule],
  template: `
    <form class="row" (ngSubmit)="draw()">
      <mat-form-field>
        <mat-label>After the prefix</mat-label>
        <input matInput name="prefix" [ngModel]="prefix()" (ngModelChange)="prefix.set($event)" autocomplete="off" data-testid="map-prefix" />
        <mat-hint>empty = the first step</mat-hint>
      </mat-form-field>
      <mat-form-field class="dim">
        <mat-label>Across</mat-label>
        <mat-select name="dimA" [ngModel]="dimA()" (ngModelChange)="dimA.set($event)">
          @for (d of dims(); track d) { <mat-option [value]="d">noise {{ d + 1 }}</mat-option> }
        </mat-select>
      </mat-form-field>
      <mat-form-field class="dim">
        <mat-label>Up</mat-label>
        <mat-select name="dimB" [ngModel]="dimB()" (ngModelChange)="dimB.set($event)">
          @for (d of dims(); track d) { <mat-option [value]="d">noise {{ d + 1 }}</mat-option> }
        </mat-select>
      </mat-form-field>
      <button mat-stroked-button type="submit" [disabled]="busy()" data-testid="draw-map"><mat-icon>grid_on</mat-icon> Draw</button>
    </form>
    @if (busy()) { <mat-progress-bar mode="indeterminate" aria-label="Drawing the noise map" /> }
    @if (problem(); as message) { <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div> }
    @if (drawing(); as m) {
      <div class="map-wrap">
        <div class="axis-up nw-mono">noise {{ m.dims[1] + 1 }} ↑ (−{{ range }} … {{ range }})</div>
        <div class="map" [style.grid-template-columns]="'repeat(' + m.steps + ', 1fr)'" role="img" data-testid="noise-map"
             [attr.aria-label]="'Noise map of ' + m.cells.length + ' cells coloured by the most likely next character'">
          @for (c of m.cells; track c.key) {
            <div class="cell" [class.unsure]="c.unsure" [style.background-color]="c.colour" [style.color]="c.ink" [title]="c.title">
              <span>{{ c.char ?? '·' }}</span></div>
          }
        </div>
        <div class="axis-across nw-mono">noise {{ m.dims[0] + 1 }} → (−{{ range }} … {{ range }})</div>
        <ul class="legend" aria-label="Characters on the map" data-testid="noise-map-legend">
          @for (l of m.legend; track l.label) {
            <li><span class="swatch" [style.background]="l.colour" [style.color]="l.ink">{{ l.char ?? '·' }}</span><span class="nw-mono">{{ l.label }}</span>
              <span class="nw-num nw-muted">{{ l.cells }}</span></li>
          }
        </ul>
      </div>
    }
    <p class="nw-muted caption">Each cell is one noise value ξ on a {{ steps }} × {{ steps }} grid over two noise dimensions (the others at 0), sent
      through the generative flow from the state after the prefix; its label and colour are the most likely next character there
      (· = end of word), and hatched cells are those where that character has a probability below {{ unsureBelow }}. Large
      single-colour areas mean the noise barely changes the next character; many small patches mean the noise decides it.
      Colours: the eight of Okabe and Ito's colour-blind-safe set (Color Universal Design, 2008) for the seven most frequent
      characters on the map and the end of the word; further characters are grey and told by their labels.</p>
  `,
  styles: `
    .row { display: flex; gap: 12px; align-items: baseline; flex-wrap: wrap; }
    .dim { width: 130px; }
    .map-wrap { display: grid; grid-template-columns: auto minmax(0, 420px) auto; grid-template-rows: auto auto; gap: 6px 12px; align-items: center; }
    .axis-up { writing-mode: vertical-rl; transform: rotate(180deg); font-size: 11px; color: var(--mat-sys-on-surface-variant); }
    .map { display: grid; aspect-ratio: 1; border: 1px solid var(--mat-sys-outline-variant); background: #fffdf8; }
    .cell { display: flex; align-items: center; justify-content: center; font: 600 10px var(--nw-mono); overflow: hidden; }
    .cell.unsure { background-image: repeating-linear-gradient(45deg, rgba(255, 253, 248, 0.4) 0 1.5px, transparent 1.5px 6px); }
    .axis-across { grid-column: 2; text-align: center; font-size: 11px; color: var(--mat-sys-on-surface-variant); }
    .legend { grid-column: 3; grid-row: 1; list-style: none; margin: 0; padding: 0; display: grid; gap: 4px; align-self: start; }
    .legend li { display: flex; gap: 6px; align-items: center; }
    .swatch { width: 16px; height: 16px; border-radius: 3px; display: inline-flex; align-items: center; justify-content: center; font: 600 10px var(--nw-mono); }
    .caption { font: var(--mat-sys-body-small); margin-top: 16px; }
  `,
})
export class NoiseMapPanel {
  readonly load = input.required<() => Promise<{ stateSize: number; alphabet: string[] }>>();
  readonly stateSize = input.required<number>();
  readonly seed = input(1);
  /** A precomputed map (from the stored evaluation) shown before anything is drawn. */
  readonly initial = input<NoiseMap | null>(null);
  readonly alphabet = input.required<string[]>();
  private readonly worker = inject(EvaluationWorker);
  protected readonly prefix = signal('');
  protected readonly dimA = signal(0);
  protected readonly dimB = signal(1);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  private readonly map = signal<NoiseMap | null>(null);
  protected readonly steps = STEPS;
  protected readonly range = RANGE;
  protected readonly unsureBelow = UNSURE_BELOW;
  protected readonly dims = computed(() => Array.from({ length: this.stateSize() }, (_, i) => i));
  protected readonly drawing = computed(() => {
    const m = this.map() ?? this.initial();
    return m ? { ...mapCells(m, this.alphabet()), dims: m.dims } : null;
  });

  protected async draw(): Promise<void> {
    this.busy.set(true);
    this.problem.set(null);
    try {
      const unknown = [...new Set(Array.from(this.prefix().trim()).filter((c) => !this.alphabet().includes(c)))];
      if (unknown.length > 0) {
        throw new Error(`The model never saw ${unknown.map((c) => `“${c}”`).join(', ')}; use only these characters: ${this.alphabet().join(' ')}.`);
      }
      if (this.dimA() === this.dimB()) throw new Error('Choose two different noise dimensions for the two directions.');
      await this.load()();
      this.map.set(await this.worker.noiseMap({
        prefix: this.prefix().trim(), dims: [this.dimA(), this.dimB()], steps: STEPS, range: RANGE, particles: 512, seed: this.seed(),
      }));
    } catch (e) {
      this.problem.set(e instanceof Error ? e.message : String(e));
    } finally {
      this.busy.set(false);
    }
  }
}
