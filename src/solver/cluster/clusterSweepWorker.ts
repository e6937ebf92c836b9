// Worker thread of the cluster method (clusterSweepExecutor.ts): receives the solver layout
// (shared memory), the lattice shape and its share of the clusters once ('attach'), builds
// its own cluster driver over the shared phi, then solves its share of one colour per
// 'colour' message and of all clusters per 'measure' message, writing phi, delta and the
// measured fields straight into shared memory. Each cluster always belongs to the same
// share, so its warm vector lives in one thread and its history is the same for any
// thread count.

import { parentPort, workerData } from 'node:worker_threads';
import { viewsOf } from '../solverState.js';
import { createClusterDriver, type ClusterDriver } from './clusterLattice.js';
import { modelOfState, type ClusterAttach, type ClusterCommand, type ClusterWorkerReply } from './clusterWorkerProtocol.js';

const port = parentPort;
if (port === null) throw new Error('clusterSweepWorker.js must run in a worker thread');
const { index } = workerData as { index: number };

let driver: ClusterDriver | null = null;
let attached: ClusterAttach | null = null;
let views: ReturnType<typeof viewsOf> | null = null;
let bondCorrelation: Float64Array[] = [];
let bondExact: Uint8Array[] = [];

function reply(message: ClusterWorkerReply): void {
  port!.postMessage(message);
}

port.on('message', (message: ClusterCommand) => {
  try {
    if (message.type === 'attach') {
      attached = message;
      views = viewsOf(message.layout);
      const model = modelOfState(views, message.shape, message.periodic);
      driver = createClusterDriver(model, views.fields.phi, { cluster: message.cluster, warmStartBytes: message.warmStartBytes });
      bondCorrelation = message.bondCorrelation.map((b) => new Float64Array(b));
      bondExact = message.bondExact.map((b) => new Uint8Array(b));
      reply({ type: 'done', value: 0 });
      return;
    }
    if (driver === null || attached === null || views === null) throw new Error('cluster worker: command before attach');
    const share = { index: index + 1, count: attached.shares };
    if (message.type === 'colour') {
      const change = driver.sweepColour(message.colour, message.mu, message.temperature, message.looseTolerance, views.fields.delta, share);
      reply({ type: 'done', value: change });
    } else if (message.type === 'measure') {
      driver.measure(message.mu, message.temperature, { ...views.measure, bondCorrelation, bondExact }, share);
      reply({ type: 'done', value: 0 });
    } else if (message.type === 'statistics') {
      reply({ type: 'statistics', ...driver.statistics() });
    }
  } catch (err) {
    reply({ type: 'failed', message: err instanceof Error ? err.message : String(err) });
  }
});
