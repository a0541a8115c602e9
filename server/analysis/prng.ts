/**
 * A small seeded pseudo-random generator: mulberry32 (Tommy Ettinger's 32-bit generator, public
 * domain, widely reproduced). Same seed → same sequence on every platform; not for security.
 */
export interface Prng {
  /** Next uint32. */
  nextUint32(): number;
  /** Uniform in [0, 1). */
  next(): number;
  /** Uniform integer in [0, n). */
  nextInt(n: number): number;
}

export function mulberry32(seed: number): Prng {
  let state = seed >>> 0;
  const nextUint32 = (): number => {
    state = (state + 0x6d2b79f5) | 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (t ^ (t >>> 14)) >>> 0;
  };
  return {
    nextUint32,
    next: () => nextUint32() / 4294967296,
    nextInt: (n: number) => Math.floor((nextUint32() / 4294967296) * n),
  };
}
