import { strict as assert } from 'node:assert';
import { EXIT_INTERRUPTED } from '../../src/cli/command';
import { cancelOnSignals } from '../../src/cli/interrupt';

/** Resolves once `done()` holds (signals reach the process through its event loop). */
async function until(done: () => boolean): Promise<void> {
  for (let i = 0; i < 200 && !done(); i++) await new Promise((resolve) => setTimeout(resolve, 5));
  assert.ok(done(), 'the signal was not handled within a second');
}

describe('cancelOnSignals (real signals sent to this process; SIGUSR2 stands in for Ctrl-C)', () => {
  it('the first signal aborts the analysis, a second exits at once with 130', async () => {
    const abort = new AbortController();
    const exits: number[] = [];
    const stop = cancelOnSignals(abort, { signals: ['SIGUSR2'], exit: (code) => exits.push(code) });
    try {
      process.kill(process.pid, 'SIGUSR2');
      await until(() => abort.signal.aborted);
      assert.deepEqual(exits, [], 'the first signal only cancels: the command then ends as usual');
      process.kill(process.pid, 'SIGUSR2');
      await until(() => exits.length > 0);
      assert.deepEqual(exits, [EXIT_INTERRUPTED]);
      assert.equal(EXIT_INTERRUPTED, 130, '128 + SIGINT, the shell convention (common practice, no source)');
    } finally {
      stop();
    }
    assert.equal(process.listenerCount('SIGUSR2'), 0, 'stop() removes the listeners');
  });
});
