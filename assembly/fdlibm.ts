// exp and log of fdlibm (Sun Microsystems, 1993; e_exp.c and e_log.c), the versions V8 uses
// for Math.exp and Math.log, ported operation for operation so that the WebAssembly kernel
// gives the same doubles as the JavaScript reference kernel (checked bit for bit against
// Math.exp / Math.log in test/solver/kernel-paths.test.ts).

@inline function highWord(x: f64): i32 {
  return <i32>(reinterpret<u64>(x) >> 32);
}
@inline function lowWord(x: f64): u32 {
  return <u32>reinterpret<u64>(x);
}
@inline function fromWords(hi: i32, lo: u32): f64 {
  return reinterpret<f64>((<u64><u32>hi << 32) | <u64>lo);
}

export function fdExp(x: f64): f64 {
  const o_threshold: f64 = 7.09782712893383973096e2;
  const u_threshold: f64 = -7.45133219101941108420e2;
  const ln2HI0: f64 = 6.93147180369123816490e-1;
  const ln2LO0: f64 = 1.90821492927058770002e-10;
  const invln2: f64 = 1.44269504088896338700e0;
  const P1: f64 = 1.66666666666666019037e-1;
  const P2: f64 = -2.77777777770155933842e-3;
  const P3: f64 = 6.61375632143793436117e-5;
  const P4: f64 = -1.65339022054652515390e-6;
  const P5: f64 = 4.13813679705723846039e-8;
  const E: f64 = 2.718281828459045;
  const huge: f64 = 1.0e300;
  const twom1000: f64 = 9.33263618503218878990e-302;
  const two1023: f64 = 8.988465674311579539e307;
  let hi: f64 = 0.0;
  let lo: f64 = 0.0;
  let k: i32 = 0;
  let hx: u32 = <u32>highWord(x);
  const xsb: i32 = <i32>((hx >> 31) & 1);
  hx &= 0x7fffffff;
  if (hx >= 0x40862e42) {
    if (hx >= 0x7ff00000) {
      if (((hx & 0xfffff) | lowWord(x)) != 0) return x + x;
      return xsb == 0 ? x : 0.0;
    }
    if (x > o_threshold) return huge * huge;
    if (x < u_threshold) return twom1000 * twom1000;
  }
  if (hx > 0x3fd62e42) {
    if (hx < 0x3ff0a2b2) {
      if (x == 1.0) return E;
      hi = xsb == 0 ? x - ln2HI0 : x + ln2HI0;
      lo = xsb == 0 ? ln2LO0 : -ln2LO0;
      k = 1 - xsb - xsb;
    } else {
      k = <i32>(invln2 * x + (xsb == 0 ? 0.5 : -0.5));
      const t = <f64>k;
      hi = x - t * ln2HI0;
      lo = t * ln2LO0;
    }
    x = hi - lo;
  } else if (hx < 0x3e300000) {
    if (huge + x > 1.0) return 1.0 + x;
  } else {
    k = 0;
  }
  const t = x * x;
  let twopk: f64;
  if (k >= -1021) twopk = fromWords(0x3ff00000 + (k << 20), 0);
  else twopk = fromWords(0x3ff00000 + ((k + 1000) << 20), 0);
  const c = x - t * (P1 + t * (P2 + t * (P3 + t * (P4 + t * P5))));
  if (k == 0) return 1.0 - ((x * c) / (c - 2.0) - x);
  const y = 1.0 - ((lo - (x * c) / (2.0 - c)) - hi);
  if (k >= -1021) {
    if (k == 1024) return y * 2.0 * two1023;
    return y * twopk;
  }
  return y * twopk * twom1000;
}

export function fdLog(x: f64): f64 {
  const ln2_hi: f64 = 6.93147180369123816490e-1;
  const ln2_lo: f64 = 1.90821492927058770002e-10;
  const two54: f64 = 1.80143985094819840000e16;
  const Lg1: f64 = 6.666666666666735130e-1;
  const Lg2: f64 = 3.999999999940941908e-1;
  const Lg3: f64 = 2.857142874366239149e-1;
  const Lg4: f64 = 2.222219843214978396e-1;
  const Lg5: f64 = 1.818357216161805012e-1;
  const Lg6: f64 = 1.531383769920937332e-1;
  const Lg7: f64 = 1.479819860511658591e-1;
  let hx: i32 = highWord(x);
  const lx: u32 = lowWord(x);
  let k: i32 = 0;
  if (hx < 0x00100000) {
    if (((hx & 0x7fffffff) | <i32>lx) == 0) return -Infinity;
    if (hx < 0) return NaN;
    k -= 54;
    x *= two54;
    hx = highWord(x);
  }
  if (hx >= 0x7ff00000) return x + x;
  k += (hx >> 20) - 1023;
  hx &= 0x000fffff;
  let i: i32 = (hx + 0x95f64) & 0x100000;
  x = fromWords(hx | (i ^ 0x3ff00000), lowWord(x));
  k += i >> 20;
  const f = x - 1.0;
  if ((0x000fffff & (2 + hx)) < 3) {
    if (f == 0.0) {
      if (k == 0) return 0.0;
      const dk0 = <f64>k;
      return dk0 * ln2_hi + dk0 * ln2_lo;
    }
    const R0 = f * f * (0.5 - 0.33333333333333333 * f);
    if (k == 0) return f - R0;
    const dk1 = <f64>k;
    return dk1 * ln2_hi - ((R0 - dk1 * ln2_lo) - f);
  }
  const s = f / (2.0 + f);
  const dk = <f64>k;
  const z = s * s;
  i = hx - 0x6147a;
  const w = z * z;
  const j: i32 = 0x6b851 - hx;
  const t1 = w * (Lg2 + w * (Lg4 + w * Lg6));
  const t2 = z * (Lg1 + w * (Lg3 + w * (Lg5 + w * Lg7)));
  i |= j;
  const R = t2 + t1;
  if (i > 0) {
    const hfsq = 0.5 * f * f;
    if (k == 0) return f - (hfsq - s * (hfsq + R));
    return dk * ln2_hi - ((hfsq - (s * (hfsq + R) + dk * ln2_lo)) - f);
  }
  if (k == 0) return f - s * (f - R);
  return dk * ln2_hi - ((s * (f - R) - dk * ln2_lo) - f);
}

export function expForTest(x: f64): f64 {
  return fdExp(x);
}
export function logForTest(x: f64): f64 {
  return fdLog(x);
}
