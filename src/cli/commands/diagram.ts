// `tiercake diagram`: the homogeneous mean-field phase map in the (zJ/U, mu/U) plane with
// the computed Mott-lobe boundaries. Options -> phaseMap (src/solver) -> files
// (src/output/diagramOutputs.ts).

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { writeOutputFolder } from '../../output/outputFolder.js';
import { writeDiagramFiles, type DiagramSettings } from '../../output/diagramOutputs.js';
import { checkDiagramCluster, checkDiagramTruncation, diagramMap } from '../../pipeline/diagramMap.js';
import { diagramSummaryLines } from '../../report/diagramSummaryLines.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { parseInteger, parseReal } from '../numberText.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = ['zjMax', 'mu', 'grid', 'kt', 'nmax', 'shade', 'cluster', 'out', 'force'] as const;

export function registerDiagram(program: Command, context: CommandContext): void {
  const command = program.command('diagram').description('homogeneous mean-field phase map in the (zJ/U, mu/U) plane with the Mott-lobe boundaries');
  declare(command, OPTIONS, {
    zjMax: { default: '0.25' },
    mu: { default: '-0.2:3' },
    grid: { default: '400x400' },
    kt: { default: '0' },
    nmax: { default: '10' },
    shade: { default: 'phi' },
    out: { default: 'out/phase-map' },
  }).action(async (options: RawOptions) => {
    context.exitCode = await runDiagram(options);
  });
}

/** The options checked and converted; every message names the option. */
export function parseDiagramOptions(raw: RawOptions): DiagramSettings & { out: string; force: boolean; cluster: number[] | null } {
  const o = readOptions(raw, OPTIONS);
  const muParts = (o.mu ?? '-0.2:3').split(':');
  if (muParts.length !== 2) throw new InputError(`--mu: expected from:to, e.g. -0.2:3, got ${JSON.stringify(o.mu)}`);
  const muMin = parseReal(muParts[0], '--mu (from)', { min: -100, minOpen: true });
  const muMax = parseReal(muParts[1], '--mu (to)', { min: muMin, minOpen: true, max: 100, maxOpen: true });
  const grid = /^(\d+)x(\d+)$/.exec(o.grid ?? '400x400');
  if (!grid) throw new InputError(`--grid: expected COLSxROWS, e.g. 400x400, got ${JSON.stringify(o.grid)}`);
  const columns = parseInteger(grid[1], '--grid (columns)', { min: 2, max: 4000 });
  const rows = parseInteger(grid[2], '--grid (rows)', { min: 2, max: 4000 });
  const nmax = o.nmax ?? 10;
  checkDiagramTruncation(nmax, muMax);
  let cluster: number[] | null = null;
  if (o.cluster !== undefined) {
    if (!/^\d{1,2}(x\d{1,2}){0,2}$/.test(o.cluster)) throw new InputError(`--cluster: expected a cluster shape such as 2x2 or 2x2x2, got ${JSON.stringify(o.cluster)}`);
    cluster = o.cluster.split('x').map((t, d) => parseInteger(t, `--cluster (extent ${d + 1})`, { min: 1, max: 16 }));
    checkDiagramCluster(cluster, o.kt ?? 0);
  }
  return {
    cluster,
    zJMax: o.zjMax ?? 0.25,
    muMin,
    muMax,
    columns,
    rows,
    temperature: o.kt ?? 0,
    nmax,
    shade: (o.shade ?? 'phi') as DiagramSettings['shade'],
    out: o.out ?? 'out/phase-map',
    force: o.force ?? false,
  };
}

export async function runDiagram(raw: RawOptions): Promise<number> {
  const s = parseDiagramOptions(raw);
  const outDir = resolve(s.out);
  const target = outputTarget(s.out, { force: s.force });
  const t0 = performance.now();
  const { result, lobes } = diagramMap(s, (n) => process.stderr.write(`tiercake diagram: cluster ${s.cluster!.join('x')} lobe n = ${n} ...\n`));
  const seconds = (performance.now() - t0) / 1000;
  const cluster = lobes === null ? null : { shape: s.cluster!, lobes };
  const { commit } = await writeOutputFolder(target, { command: 'diagram', scenarioHash: null }, (folder) => writeDiagramFiles(result, s, seconds, folder, cluster));
  reportCommit(commit);
  process.stdout.write(`${diagramSummaryLines(result, s, cluster, seconds, outDir).join('\n')}\n`);
  return ExitCode.done;
}
