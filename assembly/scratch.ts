// Per-thread scratch memory of the WebAssembly site kernel (AssemblyScript). Each thread's
// instance owns one slot of the shared memory (SLOT_BYTES, laid out below); nothing here
// is shared between threads. Scalar arrays hold one double per Fock state (stride 8 bytes),
// pair arrays two (stride 16, lanes = two sites of one colour).

export const SLOT_BYTES: i32 = 16384;
const VEC: i32 = 256; // bytes per scalar array (up to 32 states)
const PAIR: i32 = 320; // bytes per pair array (up to 20 states; the kernel takes 17)

// scalar workspace (the same roles as src/solver/site/siteWorkspace.ts)
export const DIAG: i32 = 0;
export const OFFSQ: i32 = DIAG + VEC;
export const LEAD: i32 = OFFSQ + VEC;
export const SLOPE: i32 = LEAD + VEC;
export const CURV: i32 = SLOPE + VEC;
export const TRAIL: i32 = CURV + VEC;
export const AMP: i32 = TRAIL + VEC;
export const EIG: i32 = AMP + VEC;
export const QLOFF: i32 = EIG + VEC;
export const POP: i32 = QLOFF + VEC;
export const COUPL: i32 = POP + VEC;
export const SQRTUP: i32 = COUPL + VEC;
export const EVEC: i32 = SQRTUP + VEC; // states x states, up to 17 x 17
export const PAIR_BASE: i32 = EVEC + 17 * 17 * 8 + 8;
// pair workspace (16-byte aligned); the quad kernel (groundQuad.ts) uses two of them, the
// second PAIR_SET bytes after the first, each with its own copy of the constant tables
export const P_DIAG: i32 = (PAIR_BASE + 15) & ~15;
export const P_OFFSQ: i32 = P_DIAG + PAIR;
export const P_LEAD: i32 = P_OFFSQ + PAIR;
export const P_SLOPE: i32 = P_LEAD + PAIR;
export const P_CURV: i32 = P_SLOPE + PAIR;
export const P_TRAIL: i32 = P_CURV + PAIR;
export const P_AMP: i32 = P_TRAIL + PAIR;
// constant tables of the pair kernel: (k, k) and (sqrt(k + 1), sqrt(k + 1))
export const P_INDEX: i32 = P_AMP + PAIR;
export const P_SQRTUP: i32 = P_INDEX + PAIR;
// Gershgorin radius per unit psi, (sqrt(n), sqrt(n + 1)) summed per state
export const P_RADIUS: i32 = P_SQRTUP + PAIR;
/** bytes of one pair workspace (the arrays above) */
export const PAIR_SET: i32 = P_RADIUS + PAIR - P_DIAG;
// thermal warm path: indices of the refined levels (i32)
export const T_LEVELS: i32 = P_DIAG + 2 * PAIR_SET;
export const SCRATCH_END: i32 = T_LEVELS + 128;
