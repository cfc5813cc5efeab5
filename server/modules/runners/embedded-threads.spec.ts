import { describe, expect, it } from 'vitest';
import * as fake from '../../testing/fake-runner-embedded';
import { startEmbeddedRunnerThreads } from './embedded-threads';

const options = { serverUrl: 'http://127.0.0.1:4300', token: `nwr_${'b'.repeat(43)}`, threads: 3, name: 'This server' };

describe('embedded runner threads adapter', () => {
  it('starts the threads through the runner program’s startRunnerThreads and hands back stop()', async () => {
    const threads = await startEmbeddedRunnerThreads(options, () => undefined, '../../testing/fake-runner-embedded');
    expect(fake.started).toEqual([options]);
    await threads!.stop();
    expect(fake.stopped).toBe(1);
  });

  it('says in one line that the threads are off when the runner program is missing, and does not throw', async () => {
    const lines: string[] = [];
    const threads = await startEmbeddedRunnerThreads(options, (line) => lines.push(line), '../../testing/no-such-runner-embedded');
    expect(threads).toBeNull();
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/Runner threads are off: .*no-such-runner-embedded.*npm run runner/);
  });
});
