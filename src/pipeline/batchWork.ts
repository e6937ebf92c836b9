// The work of one `tiercake submit`: an ensemble of N realisations or a scan, checked
// against the scenario as `ensemble` and `scan` check it, with the arguments every shard
// task runs (and the same for a resubmission's submit command line), what identifies the
// work (scenario hash; the ensemble's settings or the scan's identity hash) and how many
// units (blocks or chains) the shards split.

import { prepareScenario } from './prepareScenario.js';
import { planBlocks, type BlockPlan } from './ensemble/blockPlan.js';
import { DEFAULT_BLOCK_SIZE } from './ensemble/ensembleSetup.js';
import { DEFAULT_BINS_PER_ATOM, histogramBins } from './ensemble/histogramBins.js';
import type { ScanAxis } from './scan/scanPlan.js';
import { scanSetup, type ScanChoices, type ScanSetup } from './scan/scanSetup.js';
import { scenarioHash } from '../scenario/scenarioHash.js';
import { InputError } from '../scenario/inputError.js';

export interface BatchWork {
  kind: 'ensemble' | 'scan';
  scenarioName: string;
  scenarioHash: string;
  /** ensemble: realisations, block size and the histogram bins (JSON), and the blocks */
  ensemble: { realisations: number; blockSize: number; bins: string } | null;
  blocks: BlockPlan | null;
  /** scan: what scanSetup made of the options (its identity hash and description are src/output/scanIdentity.ts's) */
  scan: ScanSetup | null;
  /** options of every shard task that describe the work */
  workArgs: string[];
  /** the same for the submit command line (a resubmission) */
  submitWorkArgs: string[];
  /** how many units (blocks or chains) the shards split */
  units: number;
  unitName: 'blocks' | 'chains';
}

/** The values of submit's work options (undefined: not given). */
export interface BatchWorkChoices extends ScanChoices {
  ensemble?: number;
  scan?: boolean;
  vary?: string[];
  log?: boolean;
  blockSize?: number;
  binsPerAtom?: number;
}

const optionName = (name: string): string => `--${name.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}`;

/** `axes` parses the --vary options (asked only for a scan, after the other checks). */
export function batchWork(scenarioPath: string, o: BatchWorkChoices, axes: () => readonly ScanAxis[], memoryLimitBytes: number): BatchWork {
  const isScan = o.scan === true || (o.vary?.length ?? 0) > 0;
  if ((o.ensemble !== undefined) === isScan) {
    throw new InputError('submit: give either --ensemble N (a disorder ensemble of N realisations) or --scan with --vary PATH=FROM:TO:COUNT (a scan)');
  }
  const sets = (o.set ?? []).flatMap((s) => ['--set', s]);
  if (!isScan) {
    for (const name of ['log', 'fixed', 'chainLength', 'realisations', 'keepPoints'] as const) {
      if (o[name] !== undefined) throw new InputError(`${optionName(name)}: belongs to --scan, not to --ensemble; leave it out`);
    }
    const realisations = o.ensemble as number;
    const blockSize = o.blockSize ?? DEFAULT_BLOCK_SIZE;
    const { scenario } = prepareScenario(scenarioPath, o.set ?? [], { memoryLimitBytes });
    if (!scenario.disorder) throw new InputError('--ensemble: the scenario has no disorder block, so every realisation would be the same; add one (see configs/speckle-layer-ensemble.json)');
    const bins = histogramBins(scenario.truncation.nmax, o.binsPerAtom ?? DEFAULT_BINS_PER_ATOM);
    const plan = planBlocks(realisations, blockSize);
    const ensembleArgs = ['--block-size', String(blockSize), ...(o.binsPerAtom !== undefined ? ['--bins-per-atom', String(o.binsPerAtom)] : []), ...sets];
    return {
      kind: 'ensemble',
      scenarioName: scenario.name,
      scenarioHash: scenarioHash(scenario),
      ensemble: { realisations, blockSize, bins: JSON.stringify(bins) },
      blocks: plan,
      scan: null,
      workArgs: ['--realisations', String(realisations), ...ensembleArgs],
      submitWorkArgs: ['--ensemble', String(realisations), ...ensembleArgs],
      units: plan.blockCount,
      unitName: 'blocks',
    };
  }
  for (const name of ['blockSize', 'binsPerAtom'] as const) {
    if (o[name] !== undefined) throw new InputError(`${optionName(name)}: belongs to --ensemble, not to --scan; leave it out`);
  }
  const setup = scanSetup(scenarioPath, axes(), o, memoryLimitBytes);
  const scanArgs = [
    ...(o.vary ?? []).flatMap((v) => ['--vary', v]),
    ...(o.log ? ['--log'] : []),
    ...(o.fixed !== undefined ? ['--fixed', o.fixed] : []),
    '--chain-length',
    String(setup.plan.chainLength),
    ...(setup.plan.realisations > 1 ? ['--realisations', String(setup.plan.realisations)] : []),
    ...(o.keepPoints ? ['--keep-points'] : []),
    ...sets,
  ];
  return {
    kind: 'scan',
    scenarioName: setup.base.scenario.name,
    scenarioHash: setup.scenarioHash,
    ensemble: null,
    blocks: null,
    scan: setup,
    workArgs: scanArgs,
    submitWorkArgs: ['--scan', ...scanArgs],
    units: setup.plan.chainCount,
    unitName: 'chains',
  };
}
