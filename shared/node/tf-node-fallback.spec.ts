import * as core from '@tensorflow/tfjs-core';
import { describe, expect, it } from 'vitest';
import { initNodeBackend } from './tf-node';

// A separate file (its own module registry): the WASM backend is replaced by one that cannot start.
describe('initNodeBackend when WebAssembly cannot start', () => {
  it('falls back to the CPU backend and says so to the caller', async () => {
    await import('@tensorflow/tfjs-backend-wasm');
    core.removeBackend('wasm');
    core.registerBackend('wasm', () => {
      throw new Error('no WebAssembly here');
    });
    const messages: string[] = [];
    expect(await initNodeBackend('wasm', (m) => messages.push(m))).toBe('cpu');
    expect(messages).toHaveLength(1);
    expect(messages[0]).toMatch(/WebAssembly backend could not start .*CPU backend instead/);
  });
});
