/**
 * Seeded pseudorandom numbers: xoshiro128** streams seeded through SplitMix64, and stream derivation.
 *
 * Purpose: every random draw in the engine comes from here, so that the same seed gives the same result
 * in a test, a worker thread or a benchmark, and so that one stream per (phase, iteration, period) or
 * (batch, chain, period) can be derived by hashing, independently of how work is scheduled.
 *
 * References:
 * - Blackman, D. & Vigna, S. (2021). Scrambled linear pseudorandom number generators.
 *   ACM Transactions on Mathematical Software 47(4), 36. (xoshiro128**, seeding advice)
 * - Steele, G.L., Lea, D. & Flood, C.H. (2014). Fast splittable pseudorandom number generators.
 *   OOPSLA 2014. (SplitMix64 and its finaliser, used for seeding and for hashing stream keys)
 */

const MASK64 = (1n << 64n) - 1n;
const GOLDEN64 = 0x9e3779b97f4a7c15n;

/** The SplitMix64 output function (a bijective 64-bit finaliser). */
function mix64(z: bigint): bigint {
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
  return z ^ (z >> 31n);
}

function toUint64(value: number, what: string): bigint {
  if (!Number.isSafeInteger(value)) {
    throw new Error(`prng: ${what} must be a safe integer, got ${String(value)}`);
  }
  return BigInt.asUintN(64, BigInt(value));
}

/**
 * SplitMix64 as a sequence generator: the state advances by the golden-ratio increment and each output
 * is the finaliser of the state. Exported for tests (checked against an independent Python version).
 */
export function splitMix64Sequence(seed: bigint, count: number): bigint[] {
  let state = BigInt.asUintN(64, seed);
  const out: bigint[] = [];
  for (let k = 0; k < count; k++) {
    state = (state + GOLDEN64) & MASK64;
    out.push(mix64(state));
  }
  return out;
}

/**
 * A xoshiro128** stream. Methods are small and monomorphic so V8 inlines them in the simulator's hot loop.
 */
export class Rng {
  // The state lives in an Int32Array: V8 keeps typed-array words unboxed, whereas uint32 values in
  // object fields become heap numbers (measured about ten times slower).
  private readonly s: Int32Array;

  /** Prefer `createRng(seed)`. The four words must not all be zero. */
  constructor(s0: number, s1: number, s2: number, s3: number) {
    this.s = Int32Array.of(s0 | 0, s1 | 0, s2 | 0, s3 | 0);
    if ((this.s[0] | this.s[1] | this.s[2] | this.s[3]) === 0) {
      throw new Error('prng: the xoshiro128** state must not be all zero');
    }
  }

  /** Next 32-bit output as an unsigned integer in [0, 2^32). */
  nextUint32(): number {
    const s = this.s;
    const s0 = s[0];
    const s1 = s[1];
    const s2 = s[2];
    const s3 = s[3];
    const m = Math.imul(s1, 5);
    const result = Math.imul((m << 7) | (m >>> 25), 9) >>> 0;
    const t = s1 << 9;
    const n2 = s2 ^ s0;
    const n3 = s3 ^ s1;
    s[1] = s1 ^ n2;
    s[0] = s0 ^ n3;
    s[2] = n2 ^ t;
    s[3] = (n3 << 11) | (n3 >>> 21);
    return result;
  }

  /** Uniform double in [0, 1) with 53 random bits (two 32-bit outputs: 27 high bits, then 26). */
  nextDouble(): number {
    const hi = this.nextUint32() >>> 5;
    const lo = this.nextUint32() >>> 6;
    return (hi * 67108864 + lo) * 1.1102230246251565e-16; // 2^-53
  }

  /** Uniform integer in [0, k) for 1 <= k <= 2^32 (by floor of a 53-bit double; bias below 2^-21). */
  nextInt(k: number): number {
    const r = Math.floor(this.nextDouble() * k);
    return r < k ? r : k - 1;
  }

  /** A copy of the internal state (four words), e.g. to replay a stream. */
  getState(): Uint32Array {
    return Uint32Array.from(this.s, (w) => w >>> 0);
  }

  /** Restore a state obtained from `getState`. */
  setState(state: ArrayLike<number>): void {
    if (state.length !== 4) throw new Error('prng: a state has exactly four 32-bit words');
    if ((state[0] | state[1] | state[2] | state[3]) === 0) {
      throw new Error('prng: the xoshiro128** state must not be all zero');
    }
    for (let k = 0; k < 4; k++) this.s[k] = state[k] | 0;
  }

  /** An independent copy that continues from the same point. */
  clone(): Rng {
    return new Rng(this.s[0], this.s[1], this.s[2], this.s[3]);
  }
}

/**
 * A stream from a seed (any safe integer, negative ones included). The four state words are two
 * consecutive SplitMix64 outputs, as the xoshiro authors recommend.
 */
export function createRng(seed: number): Rng {
  const [a, b] = splitMix64Sequence(toUint64(seed, 'seed'), 2);
  const words = [Number(a >> 32n), Number(a & 0xffffffffn), Number(b >> 32n), Number(b & 0xffffffffn)];
  if ((words[0] | words[1] | words[2] | words[3]) === 0) words[3] = 1; // unreachable in practice
  return new Rng(words[0], words[1], words[2], words[3]);
}

/**
 * A child seed for the stream named by `keys` under `master`, e.g. deriveSeed(master, PHASE_2, iteration,
 * period). Each key is absorbed with the SplitMix64 finaliser, position by position, so (1, 2) and (2, 1)
 * and (1) and (1, 0) give different seeds. The result is a non-negative integer below 2^53, so it can be
 * stored as a plain JSON number and passed to `createRng`.
 */
export function deriveSeed(master: number, ...keys: number[]): number {
  let h = mix64((toUint64(master, 'master seed') + GOLDEN64) & MASK64);
  for (let k = 0; k < keys.length; k++) {
    const key = toUint64(keys[k], `key ${k + 1}`);
    h = mix64((h ^ mix64((key + GOLDEN64 * BigInt(k + 2)) & MASK64)) & MASK64);
  }
  // Absorb the number of keys, so that trailing zeros are not ambiguous.
  h = mix64((h + BigInt(keys.length + 1) * GOLDEN64) & MASK64);
  return Number(h >> 11n);
}

/** Helper for callers: a fresh stream for the given keys under `master`. */
export function streamFor(master: number, ...keys: number[]): Rng {
  return createRng(deriveSeed(master, ...keys));
}

