import { describe, expect, it } from 'vitest';
import { FLOW_KINDS } from '../model/flows/flow';
import { defaultSsmSettings, validateSsmSettings } from '../model/ssm-settings';
import { createRunSchema, FLOW_LAYER_KINDS, ssmModelSchema } from './runs';

// The request schema restates the model core's limits so the client need not load TF.js; these checks
// keep the two in step (the model core's validateSsmSettings is the reference).
describe('run settings schema agrees with the model core', () => {
  it('offers exactly the flow layers the model core builds', () => {
    expect([...FLOW_LAYER_KINDS].sort()).toEqual([...FLOW_KINDS].sort());
  });

  const fields = ['stateSize', 'flowHidden', 'observationHidden', 'embeddingSize', 'encoderSize', 'proposalHidden'] as const;
  const probes = [-1, 0, 1, 2, 255, 256, 257, 511, 512, 513, 1023, 1024, 1025, 2.5];

  it.each(fields)('accepts and refuses the same values of %s', (field) => {
    for (const value of probes) {
      const core = defaultSsmSettings(5, { [field]: value });
      let coreAccepts = true;
      try {
        validateSsmSettings(core);
      } catch {
        coreAccepts = false;
      }
      const { vocabSize: _v, ...model } = core;
      expect([value, ssmModelSchema.safeParse(model).success]).toEqual([value, coreAccepts]);
    }
  });

  it('says what to fix in each message', () => {
    const result = createRunSchema.safeParse({ family: 'ssm', name: '', corpusId: 'nope', settings: { model: {}, training: { steps: 0 } } });
    expect(result.success).toBe(false);
    const messages = result.error!.issues.map((i) => i.message);
    expect(messages).toContain('Give the run a name.');
    expect(messages).toContain('Choose a corpus from this bench.');
    expect(messages).toContain('Give a number of steps of at least 1.');
    const family = createRunSchema.safeParse({ family: 'rnn' });
    expect(family.error!.issues[0]!.message).toMatch(/Choose a model family/);
  });
});
