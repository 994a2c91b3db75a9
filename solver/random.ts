/**
 * Seeded uniform numbers on [0, 1): mulberry32, a small public-domain 32-bit generator
 * (T. Ettinger). Reproducible from its seed; for sampling and benchmarks, not for cryptography.
 */
export function seededUniform(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
