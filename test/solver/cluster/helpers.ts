// Independent exact diagonalisation of the Bose-Hubbard cluster Hamiltonian for tests:
// its own basis enumeration (occupation lists keyed by strings) and a dense matrix
// diagonalised by ml-matrix's EigenvalueDecomposition, sharing no code with src/solver/cluster.
//
//   H = sum_i [U_i n_i(n_i-1)/2 - mu_i n_i] - sum_<ij> J_ij (b_i^+ b_j + h.c.) - sum_i psi_i (b_i^+ + b_i)
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

export interface ReferenceProblem {
  sites: number;
  nmax: number;
  U: number[];
  mu: number[];
  bonds: Array<{ i: number; j: number; J: number }>;
  psi?: number[];
}

export interface ReferenceResult {
  energies: number[];
  /** ground-state <n_i>, <b_i>, <b_i^+ b_j> per bond */
  density: number[];
  phi: number[];
  bondCorrelation: number[];
  dim: number;
  /** thermal averages at temperature T (if requested) */
  thermal?: { grandPotential: number; density: number[]; phi: number[]; entropy: number; bondCorrelation: number[] };
}

export function referenceDiagonalisation(p: ReferenceProblem, temperature = 0): ReferenceResult {
  const states: number[][] = [];
  const build = (prefix: number[]): void => {
    if (prefix.length === p.sites) {
      states.push(prefix.slice());
      return;
    }
    for (let n = 0; n <= p.nmax; n++) build([...prefix, n]);
  };
  build([]);
  const index = new Map(states.map((s, k) => [s.join(','), k]));
  const dim = states.length;
  const H = Matrix.zeros(dim, dim);
  const psi = p.psi ?? new Array<number>(p.sites).fill(0);
  states.forEach((s, k) => {
    let d = 0;
    for (let i = 0; i < p.sites; i++) d += 0.5 * p.U[i] * s[i] * (s[i] - 1) - p.mu[i] * s[i];
    H.set(k, k, d);
    // hopping b_i^+ b_j and b_j^+ b_i
    for (const { i, j, J } of p.bonds) {
      for (const [a, b] of [[i, j], [j, i]]) {
        if (s[b] > 0 && s[a] < p.nmax) {
          const t = s.slice();
          const amp = Math.sqrt(s[b]) * Math.sqrt(s[a] + 1);
          t[b]--;
          t[a]++;
          const l = index.get(t.join(','))!;
          H.set(l, k, H.get(l, k) - J * amp);
        }
      }
    }
    for (let i = 0; i < p.sites; i++) {
      if (s[i] < p.nmax) {
        const t = s.slice();
        t[i]++;
        const l = index.get(t.join(','))!;
        const amp = Math.sqrt(s[i] + 1);
        H.set(l, k, H.get(l, k) - psi[i] * amp);
        H.set(k, l, H.get(k, l) - psi[i] * amp);
      }
    }
  });
  const evd = new EigenvalueDecomposition(H, { assumeSymmetric: true });
  const values = evd.realEigenvalues;
  const order = values.map((v, k) => k).sort((a, b) => values[a] - values[b]);
  const V = evd.eigenvectorMatrix;
  const vec = (k: number): number[] => Array.from({ length: dim }, (_, r) => V.get(r, order[k]));
  // Index tables: the state after b_i^+ (or -1) and after b_i^+ b_j for each bond (or -1).
  const raised = states.map((s) => s.map((n, i) => (n < p.nmax ? index.get(s.map((m, l) => (l === i ? m + 1 : m)).join(','))! : -1)));
  const hopped = states.map((s) =>
    p.bonds.map(({ i, j }) => (s[j] > 0 && s[i] < p.nmax ? index.get(s.map((m, l) => (l === i ? m + 1 : l === j ? m - 1 : m)).join(','))! : -1)),
  );
  const measure = (c: number[]) => {
    const density = new Array<number>(p.sites).fill(0);
    const phi = new Array<number>(p.sites).fill(0);
    const corr = new Array<number>(p.bonds.length).fill(0);
    states.forEach((s, k) => {
      for (let i = 0; i < p.sites; i++) {
        density[i] += s[i] * c[k] * c[k];
        if (raised[k][i] >= 0) phi[i] += Math.sqrt(s[i] + 1) * c[k] * c[raised[k][i]];
      }
      p.bonds.forEach(({ i, j }, b) => {
        const t = hopped[k][b];
        if (t >= 0) corr[b] += Math.sqrt(s[j]) * Math.sqrt(s[i] + 1) * c[t] * c[k];
      });
    });
    return { density, phi, corr };
  };
  const g = vec(0);
  const sign = g.reduce((a, b) => a + b, 0) < 0 ? -1 : 1;
  const ground = measure(g.map((x) => sign * x));
  const result: ReferenceResult = {
    energies: order.map((k) => values[k]),
    density: ground.density,
    phi: ground.phi,
    bondCorrelation: ground.corr,
    dim,
  };
  if (temperature > 0) {
    const e0 = values[order[0]];
    let z = 0;
    let mean = 0;
    const density = new Array<number>(p.sites).fill(0);
    const phi = new Array<number>(p.sites).fill(0);
    const corr = new Array<number>(p.bonds.length).fill(0);
    for (let k = 0; k < dim; k++) {
      const x = (values[order[k]] - e0) / temperature;
      const w = Math.exp(-x);
      z += w;
      mean += w * x;
      const m = measure(vec(k));
      for (let i = 0; i < p.sites; i++) {
        density[i] += w * m.density[i];
        phi[i] += w * m.phi[i]; // quadratic in the state: the eigenvector sign drops out
      }
      for (let b = 0; b < p.bonds.length; b++) corr[b] += w * m.corr[b];
    }
    result.thermal = {
      grandPotential: e0 - temperature * Math.log(z),
      density: density.map((x) => x / z),
      phi: phi.map((x) => x / z),
      entropy: Math.log(z) + mean / z,
      bondCorrelation: corr.map((x) => x / z),
    };
  }
  return result;
}
