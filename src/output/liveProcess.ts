// Whether a process id still names a running process: how the leftovers of a killed run are told from work in progress.

export function processIsRunning(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    // EPERM: it exists, under another user.
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}
