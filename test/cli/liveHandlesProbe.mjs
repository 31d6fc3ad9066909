// Loaded into a kvarbook process with --import: right after the line that announces the PDF has been
// printed and the command has returned, it writes to stderr what still keeps the process alive.
import { writeSync } from 'node:fs';
import { isMainThread } from 'node:worker_threads';

export const PROBE_PREFIX = 'kvarbook-live-handles ';

if (isMainThread) {
  const write = process.stdout.write.bind(process.stdout);
  process.stdout.write = (chunk, ...rest) => {
    const written = write(chunk, ...rest);
    // setImmediate runs after every pending promise reaction: the command's return is complete by then.
    if (String(chunk).startsWith('pdf: ')) setImmediate(() => writeSync(2, `${PROBE_PREFIX}${JSON.stringify(process.getActiveResourcesInfo())}\n`));
    return written;
  };
}
