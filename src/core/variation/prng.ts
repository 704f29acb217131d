/**
 * Seeded pseudo-random numbers for Monte Carlo, so a run is reproducible from its seed on every
 * machine (Math.random is neither seedable nor specified).
 *
 * Generator: xoshiro128** 1.1 (Blackman & Vigna, 2018; reference code prng.di.unimi.it/
 * xoshiro128starstar.c): 128-bit state, period 2^128 − 1, 32-bit outputs.
 * Seeding: the seed passes through splitmix64, as the authors recommend, so nearby seeds
 * (1, 2, 3 …) give unrelated streams and no seed yields the forbidden all-zero state.
 * Normal deviates: Marsaglia's polar method (two deviates per accepted pair, no trigonometry).
 */

const MASK64 = (1n << 64n) - 1n;

/** One splitmix64 step: returns [next state, output], both unsigned 64-bit. */
export function splitmix64(state: bigint): [bigint, bigint] {
  const s = (state + 0x9e3779b97f4a7c15n) & MASK64;
  let z = s;
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
  return [s, z ^ (z >> 31n)];
}

export class Xoshiro128 {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  /** Second deviate of the last polar pair, or NaN when none is pending. */
  private spare = Number.NaN;

  /** Start from an explicit 128-bit state (four 32-bit words, not all zero). */
  constructor(s0: number, s1: number, s2: number, s3: number) {
    this.s0 = s0 >>> 0; this.s1 = s1 >>> 0; this.s2 = s2 >>> 0; this.s3 = s3 >>> 0;
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1; // all-zero is a fixed point
  }

  /** Generator for an integer seed (any finite number; the fraction is dropped). */
  static fromSeed(seed: number): Xoshiro128 {
    const start = BigInt.asUintN(64, BigInt(Number.isFinite(seed) ? Math.trunc(seed) : 0));
    const [st1, a] = splitmix64(start);
    const [, b] = splitmix64(st1);
    return new Xoshiro128(Number(a & 0xffffffffn), Number(a >> 32n), Number(b & 0xffffffffn), Number(b >> 32n));
  }

  /** Next 32-bit output as an unsigned integer. */
  nextUint32(): number {
    const s1 = this.s1;
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /** Uniform in [0, 1) with 53 random bits. */
  nextDouble(): number {
    const hi = this.nextUint32() >>> 5;   // 27 bits
    const lo = this.nextUint32() >>> 6;   // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  }

  /** Standard normal deviate, N(0, 1). */
  nextGaussian(): number {
    if (!Number.isNaN(this.spare)) {
      const g = this.spare;
      this.spare = Number.NaN;
      return g;
    }
    let u: number, v: number, s: number;
    do {
      u = 2 * this.nextDouble() - 1;
      v = 2 * this.nextDouble() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt(-2 * Math.log(s) / s);
    this.spare = v * f;
    return u * f;
  }

  /** Current state words, for tests against the reference implementation. */
  state(): [number, number, number, number] {
    return [this.s0 >>> 0, this.s1 >>> 0, this.s2 >>> 0, this.s3 >>> 0];
  }
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}
