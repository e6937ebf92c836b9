// Implicit QL with Wilkinson shifts on the site Hamiltonian (tql1 / tql2; Bowdler, Martin,
// Reinsch & Wilkinson, Numer. Math. 11, 293 (1968)). The one implementation lives in
// src/numerics/tridiagonalQl.ts (allocation-free, a plain boolean result, written for this
// hot path); the site primitives use it under the name they have always used. The
// WebAssembly kernel (assembly/) mirrors the same operations.

export { tridiagonalQl as implicitQl } from '../../numerics/tridiagonalQl.js';
