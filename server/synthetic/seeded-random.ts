/**
 * A small deterministic pseudo-random generator for synthetic phantom images:
 * the same seed gives the same image on every machine and Node version.
 * xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom number
 * generators", ACM TOMS 2021) seeded through splitmix32; normal deviates by
 * the Box–Muller transform. No production dependency offers a seedable
 * generator, so it is written here.
 */
export interface SeededRandom {
  /** Uniform deviate in [0, 1), 32 random bits. */
  uniform(): number;
  /** Standard normal deviate (mean 0, SD 1). */
  normal(): number;
}

/**
 * Creates a generator from an integer seed.
 * @param seed any integer; equal seeds give equal sequences.
 */
export function createSeededRandom(seed: number): SeededRandom {
  let s = seed >>> 0;
  const splitmix = (): number => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
  let a = splitmix();
  let b = splitmix();
  let c = splitmix();
  let d = splitmix();
  const next = (): number => {
    const result = Math.imul(rotl(Math.imul(b, 5), 7), 9) >>> 0;
    const t = b << 9;
    c ^= a;
    d ^= b;
    b ^= c;
    a ^= d;
    c ^= t;
    d = rotl(d, 11);
    return result;
  };
  let spare = 0;
  let hasSpare = false;
  return {
    uniform: () => next() / 4294967296,
    normal: () => {
      if (hasSpare) {
        hasSpare = false;
        return spare;
      }
      // 1 − u keeps the logarithm's argument in (0, 1].
      const u = 1 - next() / 4294967296;
      const v = next() / 4294967296;
      const radius = Math.sqrt(-2 * Math.log(u));
      const angle = 2 * Math.PI * v;
      spare = radius * Math.sin(angle);
      hasSpare = true;
      return radius * Math.cos(angle);
    },
  };
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
