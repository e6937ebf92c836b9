// Interrupting a long run: SIGINT (Ctrl-C) and SIGTERM (a batch system's time limit) set a
// flag instead of killing the process, so the run stops at the next sweep or realisation
// and the command keeps what it has (a checkpoint for `solve`, nothing half-written for the
// others) and exits with 130. The handlers are installed only while `run` runs.

export async function whileInterruptible<T>(run: (interrupted: () => boolean) => Promise<T>): Promise<T> {
  let interrupted = false;
  const onSignal = (): void => {
    interrupted = true;
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  try {
    return await run(() => interrupted);
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
  }
}
