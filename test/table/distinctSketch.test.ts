import { describe, expect, it } from 'vitest';
import { DistinctSketch, hashString } from '../../src/table/distinctSketch.js';

// Flajolet, Fusy, Gandouet & Meunier (2007): relative standard error 1.04/√m; m = 4096 gives 1.625%.
describe('HyperLogLog distinct count (Flajolet et al. 2007)', () => {
  const standardError = 1.04 / Math.sqrt(4096);
  it.each([100, 2_000, 30_000, 300_000])('estimates %i distinct values within three standard errors, however often each repeats', (n) => {
    const sketch = new DistinctSketch();
    for (let repeat = 0; repeat < 2; repeat++) for (let i = 0; i < n; i++) sketch.add(`value-${i}`);
    expect(Math.abs(sketch.estimate() / n - 1)).toBeLessThan(3 * standardError);
  });
  it('is empty at zero, and the hash spreads nearby strings over all 32 bits', () => {
    expect(new DistinctSketch().estimate()).toBe(0);
    let ones = 0;
    for (let i = 0; i < 4096; i++) ones += hashString(`id${i}`) >>> 31;
    expect(Math.abs(ones / 4096 - 0.5)).toBeLessThan(0.05);
  });
});
