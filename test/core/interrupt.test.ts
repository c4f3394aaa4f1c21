import { strict as assert } from 'node:assert';
import { EXIT_INTERRUPTED } from '../../src/cli/command';
import { cancelOnSignals } from '../../src/cli/interrupt';
import { waitUntil } from '../waitUntil';

describe('cancelOnSignals (real signals sent to this process; SIGUSR2 stands in for Ctrl-C)', () => {
  it('the first signal aborts the analysis, a second exits at once with 130', async () => {
    const abort = new AbortController();
    const exits: number[] = [];
    const stop = cancelOnSignals(abort, { signals: ['SIGUSR2'], exit: (code) => exits.push(code) });
    try {
      process.kill(process.pid, 'SIGUSR2');
      await waitUntil(() => abort.signal.aborted, 2000, 'the first signal to abort');
      assert.deepEqual(exits, [], 'the first signal only cancels: the command then ends as usual');
      process.kill(process.pid, 'SIGUSR2');
      await waitUntil(() => exits.length > 0, 2000, 'the second signal to exit');
      assert.deepEqual(exits, [EXIT_INTERRUPTED]);
      assert.equal(EXIT_INTERRUPTED, 130, '128 + SIGINT, the shell convention (common practice, no source)');
    } finally {
      stop();
    }
    assert.equal(process.listenerCount('SIGUSR2'), 0, 'stop() removes the listeners');
  });
});
