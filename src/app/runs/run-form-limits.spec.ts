import { describe, expect, it } from 'vitest';
import { NEW_RUN_MODEL_DEFAULTS, SETTING_LIMITS } from '../../../shared/model/settings-rules';
import { createRunForm } from './run-form';

// The new-run form takes its limits and defaults from shared/model/settings-rules.ts, like the server's schema.
describe('new-run form limits', () => {
  const fields = { stateSize: 'stateSize', flowHidden: 'flowHidden', observationHidden: 'observationHidden', embeddingSize: 'embeddingSize',
    encoderSize: 'encoderSize', proposalHidden: 'proposalHidden', samples: 'samples', order: 'ngramOrder' } as const;

  it.each(Object.entries(fields))('%s accepts exactly its limits', (control, key) => {
    const form = createRunForm();
    const c = form.controls.model.controls[control as keyof typeof fields];
    const [lo, hi] = SETTING_LIMITS[key];
    for (const [value, ok] of [[lo - 1, false], [lo, true], [hi, true], [hi + 1, false]] as const) {
      c.setValue(value);
      expect(c.valid).toBe(ok);
    }
  });

  it('starts from the shared defaults', () => {
    const m = createRunForm().controls.model.getRawValue();
    expect(m.stateSize).toBe(NEW_RUN_MODEL_DEFAULTS.stateSize);
    expect(m.generativeFlow).toEqual([...NEW_RUN_MODEL_DEFAULTS.generativeFlow]);
    expect(m.order).toBe(NEW_RUN_MODEL_DEFAULTS.ngramOrder);
  });
});
