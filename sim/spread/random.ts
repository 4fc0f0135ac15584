/**
 * Seeded random numbers, addressed by sample index so that any range of samples can be drawn on
 * its own (a worker thread draws exactly the samples a single-thread run would).
 *
 * Sample k of seed S gets its own stream: mulberry32 (Tommy Ettinger's 32-bit generator, public
 * domain, 2017) started from fmix32(S ⊕ fmix32(k + 1)·0x9E3779B9), where fmix32 is the finaliser
 * of Austin Appleby's MurmurHash3. Draws within a sample come from that stream in order.
 */

export const PRNG_NAME = 'mulberry32, one stream per sample seeded through the MurmurHash3 finaliser';
export const DEFAULT_SEED = 20_250_607;

/** MurmurHash3's 32-bit finaliser: a bijection that mixes every input bit into every output bit. */
export function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

/** mulberry32: uniform numbers in [0, 1) with 2³² states. */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** The stream of sample `index` for `seed`. */
export function sampleStream(seed: number, index: number): () => number {
  return mulberry32(fmix32((seed ^ Math.imul(fmix32(index + 1), 0x9e3779b9)) >>> 0));
}

/**
 * A standard normal number truncated to ±limit (redrawn outside), by the Box–Muller transform
 * (G. E. P. Box and M. E. Muller, Ann. Math. Statist. 29 (1958) 610–611).
 */
export function truncatedNormal(next: () => number, limit: number): number {
  for (;;) {
    const u1 = 1 - next(); // (0, 1]: log is finite
    const u2 = next();
    const z = Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
    if (Math.abs(z) <= limit) return z;
  }
}
