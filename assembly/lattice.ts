// Geometry and array addresses of the solver state in the shared memory, and the mean field
// psi_i = sum_j J_ij phi_j in the two summation orders of the JavaScript reference
// (src/solver/sweepKernel.ts: the sweep's per-row form and the measuring pass's per-axis
// form), so that both kernels add the same numbers in the same order.

// internal [n0, n1, n2] layout, first axis slowest (src/lattice/latticeGeometry.ts)
export let n0: i32 = 1;
export let n1: i32 = 1;
export let n2: i32 = 1;
export let periodic0: bool = false;
export let periodic1: bool = false;
export let periodic2: bool = false;
export let nmax: i32 = 1;
export let states: i32 = 2;
/** uniform U (used where interactionPtr is 0) */
export let uniformU: f64 = 0.0;
export let hopUniform0: f64 = 0.0;
export let hopUniform1: f64 = 0.0;
export let hopUniform2: f64 = 0.0;
// byte addresses of the per-site arrays (0 = absent)
export let epsPtr: i32 = 0;
export let interactionPtr: i32 = 0;
export let hop0Ptr: i32 = 0;
export let hop1Ptr: i32 = 0;
export let hop2Ptr: i32 = 0;
export let phiPtr: i32 = 0;
export let deltaPtr: i32 = 0;
export let lowerPtr: i32 = 0;
export let psiPrevPtr: i32 = 0;
export let spectrumPtr: i32 = 0;
export let couplingsPtr: i32 = 0;
export let densityPtr: i32 = 0;
export let densitySqPtr: i32 = 0;
export let parityOddPtr: i32 = 0;
export let topWeightPtr: i32 = 0;
export let entropyPtr: i32 = 0;
export let psiPtr: i32 = 0;
export let grandPotentialPtr: i32 = 0;

export function setGeometry(a: i32, b: i32, c: i32, p0: bool, p1: bool, p2: bool, truncation: i32, u: f64, j0: f64, j1: f64, j2: f64): void {
  n0 = a;
  n1 = b;
  n2 = c;
  periodic0 = p0;
  periodic1 = p1;
  periodic2 = p2;
  nmax = truncation;
  states = truncation + 1;
  uniformU = u;
  hopUniform0 = j0;
  hopUniform1 = j1;
  hopUniform2 = j2;
}

export function setFields(eps: i32, interaction: i32, hop0: i32, hop1: i32, hop2: i32, phi: i32, delta: i32, lower: i32, psiPrev: i32, spectrum: i32, couplings: i32): void {
  epsPtr = eps;
  interactionPtr = interaction;
  hop0Ptr = hop0;
  hop1Ptr = hop1;
  hop2Ptr = hop2;
  phiPtr = phi;
  deltaPtr = delta;
  lowerPtr = lower;
  psiPrevPtr = psiPrev;
  spectrumPtr = spectrum;
  couplingsPtr = couplings;
}

export function setMeasureFields(density: i32, densitySq: i32, parityOdd: i32, topWeight: i32, entropy: i32, psi: i32, grandPotential: i32): void {
  densityPtr = density;
  densitySqPtr = densitySq;
  parityOddPtr = parityOdd;
  topWeightPtr = topWeight;
  entropyPtr = entropy;
  psiPtr = psi;
  grandPotentialPtr = grandPotential;
}

@inline export function f64At(ptr: i32, i: i32): f64 {
  return load<f64>(ptr + (i << 3));
}

@inline function hopAt(ptr: i32, uniform: f64, i: i32): f64 {
  return ptr == 0 ? uniform : load<f64>(ptr + (i << 3));
}

/** U at site i */
@inline export function interactionAt(i: i32): f64 {
  return interactionPtr == 0 ? uniformU : load<f64>(interactionPtr + (i << 3));
}

/**
 * Mean field in the sweep's order (sweepColour): offsets and 0/1 weights of the row's
 * outer-axis neighbours (a missing neighbour has offset 0 and weight 0), the row axis per site.
 */
export function sweepMeanField(i: i32, c: i32, up0: i32, dn0: i32, wu0: f64, wd0: f64, up1: i32, dn1: i32, wu1: f64, wd1: f64): f64 {
  const up2: i32 = c + 1 < n2 ? 1 : periodic2 && n2 > 1 ? -(n2 - 1) : 0;
  const dn2: i32 = c > 0 ? -1 : periodic2 && n2 > 1 ? n2 - 1 : 0;
  const wu2: f64 = up2 == 0 ? 0.0 : 1.0;
  const wd2: f64 = dn2 == 0 ? 0.0 : 1.0;
  const phi = phiPtr;
  if (hop0Ptr == 0 && hop1Ptr == 0 && hop2Ptr == 0) {
    return (
      hopUniform0 * (wu0 * f64At(phi, i + up0) + wd0 * f64At(phi, i + dn0)) +
      hopUniform1 * (wu1 * f64At(phi, i + up1) + wd1 * f64At(phi, i + dn1)) +
      hopUniform2 * (wu2 * f64At(phi, i + up2) + wd2 * f64At(phi, i + dn2))
    );
  }
  return (
    wu0 * hopAt(hop0Ptr, hopUniform0, i) * f64At(phi, i + up0) +
    wd0 * hopAt(hop0Ptr, hopUniform0, i + dn0) * f64At(phi, i + dn0) +
    wu1 * hopAt(hop1Ptr, hopUniform1, i) * f64At(phi, i + up1) +
    wd1 * hopAt(hop1Ptr, hopUniform1, i + dn1) * f64At(phi, i + dn1) +
    wu2 * hopAt(hop2Ptr, hopUniform2, i) * f64At(phi, i + up2) +
    wd2 * hopAt(hop2Ptr, hopUniform2, i + dn2) * f64At(phi, i + dn2)
  );
}

/** Mean field in the measuring pass's order (meanField in sweepKernel.ts). */
export function measureMeanField(i: i32, a: i32, b: i32, c: i32): f64 {
  const phi = phiPtr;
  let psi: f64 = 0.0;
  if (n2 > 1) {
    if (c + 1 < n2) psi += hopAt(hop2Ptr, hopUniform2, i) * f64At(phi, i + 1);
    else if (periodic2) psi += hopAt(hop2Ptr, hopUniform2, i) * f64At(phi, i - n2 + 1);
    if (c > 0) psi += hopAt(hop2Ptr, hopUniform2, i - 1) * f64At(phi, i - 1);
    else if (periodic2) psi += hopAt(hop2Ptr, hopUniform2, i + n2 - 1) * f64At(phi, i + n2 - 1);
  }
  if (n1 > 1) {
    const s = n2;
    const wrap = (n1 - 1) * s;
    if (b + 1 < n1) psi += hopAt(hop1Ptr, hopUniform1, i) * f64At(phi, i + s);
    else if (periodic1) psi += hopAt(hop1Ptr, hopUniform1, i) * f64At(phi, i - wrap);
    if (b > 0) psi += hopAt(hop1Ptr, hopUniform1, i - s) * f64At(phi, i - s);
    else if (periodic1) psi += hopAt(hop1Ptr, hopUniform1, i + wrap) * f64At(phi, i + wrap);
  }
  if (n0 > 1) {
    const s = n1 * n2;
    const wrap = (n0 - 1) * s;
    if (a + 1 < n0) psi += hopAt(hop0Ptr, hopUniform0, i) * f64At(phi, i + s);
    else if (periodic0) psi += hopAt(hop0Ptr, hopUniform0, i) * f64At(phi, i - wrap);
    if (a > 0) psi += hopAt(hop0Ptr, hopUniform0, i - s) * f64At(phi, i - s);
    else if (periodic0) psi += hopAt(hop0Ptr, hopUniform0, i + wrap) * f64At(phi, i + wrap);
  }
  return psi;
}
