// Site observables of the Gutzwiller ground state from its amplitudes c_n:
// p_n = c_n^2, <n> = sum n p_n, <n^2> = sum n^2 p_n, odd-parity weight, weight on |nmax>.

import type { SiteObservables } from './siteObservables.js';
import type { SiteWorkspace } from './siteWorkspace.js';

/** Fill `out` from the ground-state amplitudes and energy left by solveGround. */
export function groundObservables(ws: SiteWorkspace, phi: number, out: SiteObservables): void {
  const amp = ws.amplitudes;
  let density = 0;
  let densitySq = 0;
  let odd = 0;
  for (let n = 0; n < ws.states; n++) {
    const p = amp[n] * amp[n];
    density += n * p;
    densitySq += n * n * p;
    if (n & 1) odd += p;
  }
  out.energy = ws.eigenvalues[0];
  out.phi = phi;
  out.density = density;
  out.densitySq = densitySq;
  out.parityOdd = odd;
  out.topWeight = amp[ws.states - 1] * amp[ws.states - 1];
  out.entropy = 0;
}
