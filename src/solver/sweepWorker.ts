// Worker thread of a sweep pool (sweepPool.ts): receives a solver layout once ('attach'),
// builds its array views and kernel, then joins every half-sweep and measuring pass the
// executor starts through the shared control block (Atomics), claiming chunks of rows,
// without messages, until told to detach.

import { parentPort, workerData } from 'node:worker_threads';
import { createSweepKernel, type KernelName, type SweepKernel } from './kernel/sweepKernels.js';
import { viewsOf, type SolverLayout } from './solverState.js';
import { COMMAND, CONTROL, controlViews, runChunks, type WorkerReply } from './sweepPool.js';

interface AttachMessage {
  type: 'attach';
  layout: SolverLayout;
  kernel: KernelName;
  slot: number;
}

const { control: shared, index } = workerData as { control: SharedArrayBuffer; index: number };
const control = controlViews(shared);
const doneAt = CONTROL.workerDone + 16 * index;
const port = parentPort;
if (port === null) throw new Error('sweepWorker.js must run in a worker thread');

function reply(message: WorkerReply): void {
  port?.postMessage(message);
}

/** Join commands until 'detach'; returns to the message loop. */
function serve(kernel: SweepKernel, generation: number): void {
  let seen = generation;
  for (;;) {
    Atomics.wait(control.ints, CONTROL.generation, seen);
    seen = Atomics.load(control.ints, CONTROL.generation);
    const command = control.ints[CONTROL.command];
    if (command === COMMAND.detach) {
      Atomics.store(control.ints, doneAt, seen);
      Atomics.notify(control.ints, doneAt);
      return;
    }
    try {
      runChunks(control, seen, command, kernel);
    } catch (err) {
      Atomics.store(control.ints, CONTROL.failed, 1);
      reply({ type: 'failed', message: err instanceof Error ? err.message : String(err) });
    }
  }
}

port.on('message', (message: AttachMessage) => {
  if (message.type !== 'attach') return;
  let kernel: SweepKernel;
  try {
    kernel = createSweepKernel(viewsOf(message.layout), message.kernel, message.slot);
  } catch (err) {
    reply({ type: 'failed', message: err instanceof Error ? err.message : String(err) });
    return;
  }
  // The generation is read before answering: commands sent after the answer are not missed.
  const generation = Atomics.load(control.ints, CONTROL.generation);
  reply({ type: 'attached' });
  serve(kernel, generation);
});
