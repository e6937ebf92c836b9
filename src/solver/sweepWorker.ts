// Worker-thread entry point (piscina): runs the sweep kernel or the measuring pass on a
// range of rows of shared solver state. The array views are rebuilt only when a task
// refers to a layout this worker has not seen yet.

import { createSiteWorkspace, type SiteWorkspace } from './site/siteWorkspace.js';
import { viewsOf, type SolverLayout, type SolverState } from './solverState.js';
import { measureRows, sweepColour } from './sweepKernel.js';

export interface SweepTask {
  layout: SolverLayout;
  layoutId: number;
  kind: 'sweep' | 'measure';
  colour: number;
  rowStart: number;
  rowEnd: number;
  mu: number;
  temperature: number;
}

let cachedId = -1;
let cached: SolverState | null = null;
let workspace: SiteWorkspace | null = null;

export default function runSweepTask(task: SweepTask): number {
  if (task.layoutId !== cachedId || cached === null) {
    cached = viewsOf(task.layout);
    cachedId = task.layoutId;
  }
  if (workspace === null || workspace.nmax !== task.layout.nmax) workspace = createSiteWorkspace(task.layout.nmax);
  if (task.kind === 'sweep') {
    return sweepColour(cached.fields, workspace, task.colour, task.rowStart, task.rowEnd, task.mu, task.temperature);
  }
  measureRows(cached.fields, cached.measure, workspace, task.rowStart, task.rowEnd, task.mu, task.temperature);
  return 0;
}
