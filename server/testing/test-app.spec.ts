import { describe, expect, it } from 'vitest';
import { createTestApp } from './test-app';

describe('test app', () => {
  it('fails on close when the app logged an error no test took, and passes once it is taken', async () => {
    const t = await createTestApp();
    t.serverErrors.push(new Error('boom in a handler'));
    await expect(t.close()).rejects.toThrow(/1 unexpected server error\(s\).*takeServerErrors[\s\S]*boom in a handler/);
    const u = await createTestApp();
    u.serverErrors.push(new Error('expected'));
    expect(u.takeServerErrors()).toHaveLength(1);
    await expect(u.close()).resolves.toBeUndefined();
  });
});
