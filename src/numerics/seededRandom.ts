// Seeded pseudo-random numbers that are identical on every machine and thread count.
// Generator: xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom number
// generators", ACM TOMS 47, 36 (2021)); 32-bit integer arithmetic only, so results never
// depend on the platform. A named seed (any string, e.g. "speckle/7") is hashed to the
// 128-bit state with FNV-1a followed by splitmix32 mixing, so "run-1" and "run-2" give
// unrelated streams.

export interface SeededRandom {
  /** Uniform double in [0, 1), 53 random bits. */
  uniform(): number;
  /** Standard normal deviate (Box-Muller, both values used in turn). */
  normal(): number;
  /** Uniform 32-bit unsigned integer. */
  uint32(): number;
}

function fnv1a32(text: string, salt: number): number {
  let h = (0x811c9dc5 ^ salt) >>> 0;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h;
}

function splitmix32(x: number): number {
  x = (x + 0x9e3779b9) | 0;
  let z = x;
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
  return (z ^ (z >>> 16)) >>> 0;
}

/** A generator whose whole stream is fixed by the seed name. */
export function seededRandom(seed: string): SeededRandom {
  let s0 = splitmix32(fnv1a32(seed, 0x1));
  let s1 = splitmix32(fnv1a32(seed, 0x2) ^ s0);
  let s2 = splitmix32(fnv1a32(seed, 0x3) ^ s1);
  let s3 = splitmix32(fnv1a32(seed, 0x4) ^ s2);
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1; // the all-zero state is a fixed point
  let spare = 0;
  let hasSpare = false;

  const uint32 = (): number => {
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = rotl(s3, 11);
    return result;
  };
  const uniform = (): number => {
    const hi = uint32() >>> 5; // 27 bits
    const lo = uint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  };
  const normal = (): number => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    let u = uniform();
    while (u === 0) u = uniform();
    const v = uniform();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    hasSpare = true;
    return r * Math.cos(2 * Math.PI * v);
  };
  return { uniform, normal, uint32 };
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}
