// Seeded pseudo-random numbers that are identical on every machine and thread count, and
// named streams, so that every consumer (disorder, ensemble realisations, camera noise,
// parity shots) draws its own reproducible sequence.
//
// Generator: xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom number
// generators", ACM TOMS 47, 36 (2021)); 32-bit integer arithmetic only, so results never
// depend on the platform. A seed name (any string, e.g. "speckle/7") is hashed to the
// 128-bit state with FNV-1a (Fowler, Noll & Vo) followed by splitmix32 mixing, so
// "run-1" and "run-2" give unrelated streams.
//
// Streams: a stream is a seed name extended by path components joined with '/',
// streamName("layer", 3) = "layer/3", streamName("camera-noise", "in-situ") =
// "camera-noise/in-situ". Different names hash to unrelated states; the same name gives
// the same numbers everywhere. Because the name is the whole key, a stream can be
// reproduced by giving its full name as a seed (realisation r of an ensemble with seed S is
// `solve` with seed "S/r"). Components must be non-empty and contain no '/', so that
// (seed, path) -> name is one-to-one for a given seed: ("a", "b", "c") and ("a", "b/c")
// cannot both exist. Two different consumers stay independent as long as their stream
// names differ, which fixed component names ("in-situ", "parity-shot") guarantee.

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

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/** The 128-bit generator state (four uint32 words) that a seed name is hashed to. */
export function seedState(seed: string): [number, number, number, number] {
  let s0 = splitmix32(fnv1a32(seed, 0x1));
  const s1 = splitmix32(fnv1a32(seed, 0x2) ^ s0);
  const s2 = splitmix32(fnv1a32(seed, 0x3) ^ s1);
  const s3 = splitmix32(fnv1a32(seed, 0x4) ^ s2);
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1; // the all-zero state is a fixed point
  return [s0, s1, s2, s3];
}

/**
 * xoshiro128** started from an explicit state (uint32 words s[0..3], not all zero). For
 * reproducing published test vectors; everything else names its stream by a seed.
 */
export function randomFromState(state: readonly [number, number, number, number]): SeededRandom {
  let [s0, s1, s2, s3] = state.map((w, i) => {
    if (!Number.isInteger(w) || w < 0 || w > 0xffffffff) {
      throw new RangeError(`randomFromState state[${i}]: expected an unsigned 32-bit integer, got ${w}`);
    }
    return w | 0;
  });
  if ((s0 | s1 | s2 | s3) === 0) throw new RangeError('randomFromState state: the all-zero state is a fixed point; give any other');
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

/** A generator whose whole stream is fixed by the seed name. */
export function seededRandom(seed: string): SeededRandom {
  return randomFromState(seedState(seed));
}

/**
 * The name of a stream below `seed`: seed/part1/part2/... Parts are non-empty strings
 * without '/', or non-negative integers (realisation numbers).
 */
export function streamName(seed: string, ...path: readonly (string | number)[]): string {
  if (typeof seed !== 'string' || seed.length === 0) {
    throw new RangeError('streamName seed: expected a non-empty seed name, e.g. "disorder"');
  }
  let name = seed;
  path.forEach((part, i) => {
    if (typeof part === 'number') {
      if (!Number.isInteger(part) || part < 0) {
        throw new RangeError(`streamName path[${i}]: expected a non-negative integer, got ${part}`);
      }
    } else if (part.length === 0 || part.includes('/')) {
      throw new RangeError(`streamName path[${i}]: expected a non-empty name without '/', got ${JSON.stringify(part)}`);
    }
    name += `/${part}`;
  });
  return name;
}

/** The generator of stream `seed/path...` (see the file header); with no path, seededRandom(seed). */
export function randomStream(seed: string, ...path: readonly (string | number)[]): SeededRandom {
  return seededRandom(streamName(seed, ...path));
}
