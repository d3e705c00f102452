/**
 * Seeded pseudo-random numbers for reproducible synthetic spectra: mulberry32, a small
 * 32-bit generator (public-domain algorithm by Tommy Ettinger), and Gaussian deviates
 * from it by the Box–Muller transform.
 */
export type Random = () => number;

/** Uniform deviates in [0, 1) from a 32-bit seed. */
export function mulberry32(seed: number): Random {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates (mean 0, standard deviation 1). */
export function gaussian(random: Random): Random {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = 0;
    while (u === 0) u = random();
    const v = random();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}
