import * as core from '@tensorflow/tfjs-core';
import * as full from '@tensorflow/tfjs';
import { describe, expect, it } from 'vitest';
import { initNodeBackend } from './tf-node';

describe('initNodeBackend', () => {
  it('selects WASM by default and shares one engine between tfjs-core and tfjs', async () => {
    expect(await initNodeBackend()).toBe('wasm');
    expect(core.getBackend()).toBe('wasm');
    expect(core.engine()).toBe(full.engine());
    // Gradients registered by the full bundle are usable from tfjs-core: d(x^3)/dx at 2 is 12 (closed form).
    const g = core.grad((x: core.Tensor) => core.pow(x, 3))(core.scalar(2));
    expect(g.dataSync()[0]).toBeCloseTo(12, 5);
    g.dispose();
  });

  it('switches to the CPU backend on request and back', async () => {
    expect(await initNodeBackend('cpu')).toBe('cpu');
    expect(core.getBackend()).toBe('cpu');
    expect(await initNodeBackend('wasm')).toBe('wasm');
  });

  it('rejects an unknown backend name with the allowed ones', async () => {
    await expect(initNodeBackend('webgl' as 'cpu')).rejects.toThrow(/use "wasm" or "cpu"/);
  });
});
