// Signal listeners are held only while asynchronous work that leaves
// something behind is under way (a write's temporary file, an engine
// query): a listener runs on the event loop, so one left installed would
// keep Ctrl-C from stopping a long synchronous computation (common practice:
// a signal's default action ends a busy process at once).
import { describe, expect, it } from 'vitest';
import { atProcessEnd, CLEANUP_SIGNALS, runProcessEndTasks, withSignalCleanup } from '../../src/cleanup.js';

const counts = () => CLEANUP_SIGNALS.map((s) => process.listenerCount(s));

describe('cleanup on signals', () => {
  it('listeners exist during guarded work only, nested work included', async () => {
    const before = counts();
    let during: number[] = [];
    let nested: number[] = [];
    await withSignalCleanup(async () => {
      during = counts();
      await withSignalCleanup(async () => {
        nested = counts();
      });
    });
    expect(during).toEqual(before.map((n) => n + 1));
    expect(nested).toEqual(during);
    expect(counts()).toEqual(before);
  });

  it('a failed piece of work releases them too', async () => {
    const before = counts();
    await expect(withSignalCleanup(async () => Promise.reject(new Error('failed')))).rejects.toThrow('failed');
    expect(counts()).toEqual(before);
  });

  it('end-of-process tasks run once, and a removed task not at all', () => {
    const ran: string[] = [];
    atProcessEnd(() => ran.push('kept'));
    const remove = atProcessEnd(() => ran.push('removed'));
    remove();
    runProcessEndTasks();
    runProcessEndTasks();
    expect(ran).toEqual(['kept']);
  });
});
