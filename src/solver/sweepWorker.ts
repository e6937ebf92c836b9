// Worker thread of a sweep pool (sweepPool.ts): receives a solver layout once ('attach'),
// builds its array views and kernel, then serves half-sweeps and measuring passes posted
// through its control block (Atomics), without messages, until told to detach.

import { parentPort, workerData } from 'node:worker_threads';
import { createSweepKernel, type KernelName, type SweepKernel } from './kernel/sweepKernels.js';
import { viewsOf, type SolverLayout } from './solverState.js';
import { claimRows, COMMAND, CONTROL, type WorkerReply } from './sweepPool.js';

interface AttachMessage {
  type: 'attach';
  layout: SolverLayout;
  kernel: KernelName;
  slot: number;
}

const { control: shared, index, workers } = workerData as { control: SharedArrayBuffer; index: number; workers: number };
const control = new Int32Array(shared, index * 64, 16);
const values = new Float64Array(shared, index * 64, 8);
const cursor = new Int32Array(shared, workers * 64, 1);
const port = parentPort;
if (port === null) throw new Error('sweepWorker.js must run in a worker thread');

function reply(message: WorkerReply): void {
  port?.postMessage(message);
}

/** Serve commands until 'detach'; returns to the message loop. */
function serve(kernel: SweepKernel, generation: number): void {
  let seen = generation;
  for (;;) {
    Atomics.wait(control, CONTROL.generation, seen);
    seen = Atomics.load(control, CONTROL.generation);
    const command = control[CONTROL.command];
    if (command !== COMMAND.detach) {
      try {
        const mu = values[CONTROL.mu];
        const temperature = values[CONTROL.temperature];
        const chunk = control[CONTROL.chunkRows];
        const rowCount = control[CONTROL.rowCount];
        const colour = control[CONTROL.colour];
        let change = 0;
        for (let start = claimRows(cursor, chunk); start < rowCount; start = claimRows(cursor, chunk)) {
          const end = Math.min(rowCount, start + chunk);
          if (command === COMMAND.sweep) {
            const c = kernel.sweep(colour, start, end, mu, temperature);
            if (c > change) change = c;
          } else kernel.measure(start, end, mu, temperature);
        }
        values[CONTROL.result] = change;
        control[CONTROL.status] = 0;
      } catch (err) {
        control[CONTROL.status] = 1;
        reply({ type: 'failed', message: err instanceof Error ? err.message : String(err) });
      }
    }
    Atomics.store(control, CONTROL.done, seen);
    Atomics.notify(control, CONTROL.done);
    if (command === COMMAND.detach) return;
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
  // The generation is read before answering: the executor posts its first command only
  // after the answer, so the worker cannot miss it.
  const generation = Atomics.load(control, CONTROL.generation);
  reply({ type: 'attached' });
  serve(kernel, generation);
});
