// The work of `tiercake diagram`: the homogeneous single-site map in the (zJ/U, mu/U) plane
// with its lobe boundaries (src/solver/phaseMap.ts) and, when a cluster shape was given, the
// cluster mean-field lobes of the fillings in the mu range (clusterLobeSet.ts). Refusals
// name the option to change: a truncation that cannot hold the map, a cluster too large.

import { phaseMap, type PhaseMapRequest } from '../solver/phaseMap.js';
import { clusterLobes, lobeFillings, lobeTruncation, LOBE_MAX_STATES, type ClusterLobe } from '../solver/cluster/clusterLobeSet.js';
import { InputError } from '../scenario/inputError.js';

/** Points along every lobe boundary (single site) and cluster lobe. */
export const DIAGRAM_BOUNDARY_POINTS = 400;
export const DIAGRAM_CLUSTER_LOBE_POINTS = 48;
/** Weight on |nmax> above which the map is refused (its truncation shows). */
export const DIAGRAM_TOP_WEIGHT_MAX = 1e-6;

export type DiagramRequest = Omit<PhaseMapRequest, 'boundaryPoints'> & { cluster: number[] | null };

export interface DiagramMap {
  result: ReturnType<typeof phaseMap>;
  /** cluster lobes, null without a cluster shape */
  lobes: ClusterLobe[] | null;
}

/** The map's truncation must leave room above the highest mu/U (|n> up to mu + 1 carries weight). */
export function checkDiagramTruncation(nmax: number, muMax: number): void {
  if (muMax + 1 >= nmax) throw new InputError(`--nmax: ${nmax} is too small for mu/U up to ${muMax}; use at least ${Math.ceil(muMax) + 3}`);
}

/** A cluster whose Fock space does not fit even at nmax 2 is refused before any work. */
export function checkDiagramCluster(cluster: readonly number[], temperature: number): void {
  if (temperature > 0) throw new InputError('--cluster: the cluster lobes are computed at T = 0; drop --kt or --cluster');
  if (lobeTruncation(cluster, 1) === null) {
    throw new InputError(`--cluster: a ${cluster.join('x')} cluster needs more than ${LOBE_MAX_STATES} Fock states even at nmax 2; use a smaller cluster (2x2, 2x4, 2x2x2)`);
  }
}

export function diagramMap(r: DiagramRequest, onClusterLobe?: (filling: number) => void): DiagramMap {
  const result = phaseMap({ zJMax: r.zJMax, muMin: r.muMin, muMax: r.muMax, columns: r.columns, rows: r.rows, temperature: r.temperature, nmax: r.nmax, boundaryPoints: DIAGRAM_BOUNDARY_POINTS });
  const lobes = r.cluster === null ? null : clusterLobes(r.cluster, lobeFillings(r.muMin, r.muMax), DIAGRAM_CLUSTER_LOBE_POINTS, onClusterLobe);
  if (result.maxTopWeight > DIAGRAM_TOP_WEIGHT_MAX) {
    throw new InputError(`--nmax: the weight on |nmax> reaches ${result.maxTopWeight.toExponential(2)} on this map; raise --nmax`);
  }
  return { result, lobes };
}
