/**
 * A seeded pseudo-random generator: xoshiro128** (32-bit state words), seeded with splitmix32.
 * Source: Blackman & Vigna 2021, "Scrambled linear pseudorandom number generators",
 * ACM Trans. Math. Softw. 47, 36 (xoshiro128** 1.1 as in the authors' reference C code; shared/science/README.md §8); splitmix32 is
 * SplitMix's golden-ratio step (Steele, Lea & Flood 2014, OOPSLA) followed by MurmurHash3's fmix32.
 * Normal deviates use the Box–Muller transform (Box & Muller 1958, Ann. Math. Stat. 29, 610).
 *
 * Deterministic: the same seed gives the same sequence in Node and in the browser. Reference vectors
 * from an independent implementation: tests/fixtures/science/rng_vectors.py → rng.json.
 */
export interface Rng {
  /** uniform integer in [0, 2³²) */
  nextUint32(): number
  /** uniform double in [0, 1) with 32 random bits */
  nextFloat(): number
  /** standard normal deviate N(0, 1) */
  nextNormal(): number
}

/**
 * splitmix32 step: a well-mixed 32-bit hash of `state`; used to expand one seed into four words.
 * Source: SplitMix's increment 0x9e3779b9 (Steele, Lea & Flood 2014), then MurmurHash3's fmix32
 * finaliser (Appleby 2011: shifts 16, 13, 16; multipliers 0x85ebca6b, 0xc2b2ae35). Checked against
 * tests/fixtures/science/rng.json.
 *
 * @param state  any 32-bit integer
 * @returns a 32-bit unsigned integer
 * @example splitmix32(1) // 2527132011 (tests/fixtures/science/rng.json)
 */
export function splitmix32(state: number): number {
  let z = (state + 0x9e3779b9) | 0
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b)
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35)
  return (z ^ (z >>> 16)) >>> 0
}

/**
 * FNV-1a 32-bit hash of a string, to derive a per-galaxy seed from its id.
 * Source: Fowler, Noll & Vo hash, FNV-1a variant (common practice; IETF draft-eastlake-fnv).
 *
 * @param text  any string
 * @returns a 32-bit unsigned integer
 * @example hashString('') // 2166136261
 */
export function hashString(text: string): number {
  let h = 0x811c9dc5
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i)
    h = Math.imul(h, 0x01000193)
  }
  return h >>> 0
}

const TWO_PI = 2 * Math.PI
const INV_2_32 = 1 / 4294967296

/**
 * Create a xoshiro128** generator from an integer seed (see the file comment for sources).
 *
 * @param seed  any finite number; its low 32 bits are used
 * @returns a generator; two generators with the same seed produce identical sequences
 * @example createRng(1).nextUint32() // 3597913440 (tests/fixtures/science/rng.json)
 */
export function createRng(seed: number): Rng {
  let s0 = splitmix32(seed | 0)
  let s1 = splitmix32(s0 ^ 0x6a09e667)
  let s2 = splitmix32(s1 ^ 0xbb67ae85)
  let s3 = splitmix32(s2 ^ 0x3c6ef372)
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1 // the all-zero state is a fixed point
  let spare = 0
  let hasSpare = false
  const nextUint32 = (): number => {
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0
    const t = s1 << 9
    s2 ^= s0
    s3 ^= s1
    s1 ^= s2
    s0 ^= s3
    s2 ^= t
    s3 = rotl(s3, 11)
    return result
  }
  const nextFloat = (): number => nextUint32() * INV_2_32
  const nextNormal = (): number => {
    if (hasSpare) {
      hasSpare = false
      return spare
    }
    // 1 − u keeps the argument of log in (0, 1]
    const r = Math.sqrt(-2 * Math.log(1 - nextFloat()))
    const theta = TWO_PI * nextFloat()
    spare = r * Math.sin(theta)
    hasSpare = true
    return r * Math.cos(theta)
  }
  return { nextUint32, nextFloat, nextNormal }
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k))
}
