/**
 * Seeded pseudo-random numbers for anything random in the engine and its tests: xoshiro128**
 * (Blackman & Vigna 2018) seeded through splitmix32 from a hex string (e.g. the worksheet's
 * content hash), so the same seed gives the same stream in every process.
 */
export interface Rng {
  /** Uniform on (0, 1), never 0 or 1. */
  uniform(): number;
  /** Standard normal (Marsaglia polar method). */
  normal(): number;
}

export function createRng(seedHex: string): Rng {
  let h = 0x9e3779b9;
  for (let i = 0; i < seedHex.length; i++) h = Math.imul(h ^ seedHex.charCodeAt(i), 0x85ebca6b) >>> 0;
  const splitmix = () => {
    h = (h + 0x9e3779b9) >>> 0;
    let z = h;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
  let s0 = splitmix();
  let s1 = splitmix();
  let s2 = splitmix();
  let s3 = splitmix();
  const next = () => {
    const result = Math.imul(rotl(Math.imul(s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (s1 << 9) >>> 0;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 = (s2 ^ t) >>> 0;
    s3 = rotl(s3 >>> 0, 11);
    s0 >>>= 0;
    s1 >>>= 0;
    return result;
  };
  let spare: number | null = null;
  const uniform = () => (next() * 4294967296 + next() + 0.5) / 18446744073709551616;
  return {
    uniform,
    normal() {
      if (spare !== null) {
        const v = spare;
        spare = null;
        return v;
      }
      for (;;) {
        const u = 2 * uniform() - 1;
        const v = 2 * uniform() - 1;
        const s = u * u + v * v;
        if (s > 0 && s < 1) {
          const f = Math.sqrt((-2 * Math.log(s)) / s);
          spare = v * f;
          return u * f;
        }
      }
    },
  };
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
