// Loaded into a kvarbook process with --import: right after the line that announces the PDF has been
// printed and the command has returned, it writes to stderr what still keeps the process alive: the
// active resources, and every pending timer that holds the process open for a second or more.
import { writeSync } from 'node:fs';
import { createHook } from 'node:async_hooks';
import { isMainThread } from 'node:worker_threads';

export const PROBE_PREFIX = 'kvarbook-live-handles ';

/** Libraries arm timers of a few milliseconds while pipes close; only a timer this long would delay the exit. */
const HOLDING_TIMER_MS = 1000;

if (isMainThread) {
  const timers = new Set();
  createHook({
    init(_id, type, _trigger, resource) {
      if (type === 'Timeout') timers.add(resource);
    },
  }).enable();
  const holdingTimers = () =>
    [...timers].filter((timer) => !timer._destroyed && timer._idleTimeout >= HOLDING_TIMER_MS && timer.hasRef()).map((timer) => timer._idleTimeout);
  const write = process.stdout.write.bind(process.stdout);
  process.stdout.write = (chunk, ...rest) => {
    const written = write(chunk, ...rest);
    // setImmediate runs after every pending promise reaction: the command's return is complete by then.
    if (String(chunk).startsWith('pdf: ')) {
      setImmediate(() =>
        writeSync(2, `${PROBE_PREFIX}${JSON.stringify({ resources: process.getActiveResourcesInfo(), holdingTimersMs: holdingTimers() })}\n`),
      );
    }
    return written;
  };
}
