// The seeded generator shared by the scripts that invent data (the demo
// survey, the benchmark files, the hostile-input corpus): mulberry32, a
// small 32-bit generator by Tommy Ettinger (public domain). The same seed
// gives the same numbers on every machine, so generated files repeat.
// Not for statistics: the simulations use src/stats/random.ts.

/** A function returning uniform numbers in [0, 1), from a 32-bit integer seed. */
export function mulberry32(seed) {
  let a = seed | 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
