// Loaded into a kvarbook process with --import: writes the process's peak resident memory to stderr as it exits.
import { writeSync } from 'node:fs';
import { isMainThread } from 'node:worker_threads';

if (isMainThread) {
  process.on('exit', () => writeSync(2, `kvarbook-peak-rss-kb ${process.resourceUsage().maxRSS}\n`));
}
