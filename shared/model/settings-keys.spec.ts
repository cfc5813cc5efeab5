import { describe, expect, it } from 'vitest';
import { decodeCheckpoint, encodeCheckpoint } from './checkpoint';
import { gruSpecs, type GruSettings } from './gru-lm';
import { renameLegacySettingKeys } from './settings-keys';

describe('settings keys', () => {
  it('renames the old GRU keys and keeps everything else', () => {
    expect(renameLegacySettingKeys({ vocabSize: 5, stateSize: 2, embedSize: 3, obsHidden: 0 }))
      .toEqual({ vocabSize: 5, stateSize: 2, embeddingSize: 3, observationHidden: 0 });
    const current = { stateSize: 2, embeddingSize: 3, observationHidden: 1 };
    expect(renameLegacySettingKeys(current)).toBe(current);
    expect(renameLegacySettingKeys({ embedSize: 9, embeddingSize: 3 })).toEqual({ embeddingSize: 3 });
  });

  it('loads a GRU checkpoint written with the old keys under the new ones', () => {
    const settings: GruSettings = { vocabSize: 3, stateSize: 2, embeddingSize: 2, observationHidden: 0 };
    const weights = Object.fromEntries(Object.entries(gruSpecs(settings)).map(([name, spec]) =>
      [name, { shape: spec.shape, values: new Float32Array(spec.shape.reduce((a, b) => a * b, 1)).fill(0.5) }]));
    const old = { vocabSize: 3, stateSize: 2, embedSize: 2, obsHidden: 0 };
    const bytes = encodeCheckpoint({ family: 'gru', settings: old, alphabet: ['a', 'b'], step: 4, seed: 1, weights, createdAt: '2026-12-01T00:00:00Z' });
    const ck = decodeCheckpoint(bytes);
    expect(ck.settings).toEqual(settings);
    expect(Object.keys(ck.weights).sort()).toEqual(Object.keys(weights).sort());
  });
});
