import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { checkRanges, cutsFor, documentArbitrary } from './parallelDocuments.js';

describe('counting a file in byte ranges equals the single reader (slow tier: longer documents, more runs)', () => {
  it('on 1,000 random documents of up to 200 rows cut at random offsets and inside quoted fields', async () => {
    const outcomes = { settled: 0, error: 0, fallback: 0 };
    await fc.assert(
      fc.asyncProperty(documentArbitrary(200), async ({ document, cutSeeds, insideSeeds }) => {
        outcomes[await checkRanges(document, cutsFor(document, cutSeeds, insideSeeds))]++;
      }),
      { numRuns: 1000 },
    );
    expect(outcomes.fallback).toBe(0);
    expect(outcomes.settled).toBeGreaterThan(100);
  });
});
