/**
 * Seeded pseudo-random numbers for Monte Carlo p-values. Never reads a clock or an unseeded source:
 * the same seed always gives the same stream, so a saved test re-runs to the same digits.
 *
 * Generator: xoshiro128** (Blackman & Vigna 2018, "Scrambled linear pseudorandom number generators"),
 * state seeded from a 32-bit integer through the splitmix32 finaliser so that nearby seeds give
 * unrelated streams.
 *
 * Kept rather than a library generator: every recorded Monte Carlo result depends on this exact stream (a
 * saved test re-runs to the same digits only if the numbers are the same), so swapping the generator would
 * turn every recorded resampled p-value into "result differs". Not a speed question; no measurement needed
 * beyond the reproducibility tests.
 */

/** A source of uniform numbers in [0, 1). */
export interface UniformSource {
  /** Uniform on [0, 1) with 53 random bits. */
  next(): number;
}

function splitmix32(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
}

export class Xoshiro128 implements UniformSource {
  private a: number;
  private b: number;
  private c: number;
  private d: number;

  /** @param seed any finite number; its integer part modulo 2³² is used (non-integers are rounded). */
  constructor(seed: number) {
    const mix = splitmix32(Math.round(seed) >>> 0);
    this.a = mix();
    this.b = mix();
    this.c = mix();
    this.d = mix();
    if ((this.a | this.b | this.c | this.d) === 0) this.d = 1; // the all-zero state is a fixed point
  }

  /** Next 32-bit unsigned integer. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.b, 5), 7), 9) >>> 0;
    const t = this.b << 9;
    this.c ^= this.a;
    this.d ^= this.b;
    this.b ^= this.c;
    this.a ^= this.d;
    this.c ^= t;
    this.d = rotl(this.d, 11);
    return result;
  }

  next(): number {
    const high = this.nextUint32() >>> 5; // 27 bits
    const low = this.nextUint32() >>> 6; // 26 bits
    return (high * 67108864 + low) / 9007199254740992;
  }
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/** Default seed when a spec gives none; recorded in the output so the run can be repeated. */
export const DEFAULT_SEED = 20260101;
