/**
 * Pre-fit checks (METHODS.md pitfalls 8.5 and 8.6, after Snijders 2001, Sociological Methodology 31):
 * a period without change cannot have its rate estimated; an estimated parameter whose statistic sits at
 * the edge of its range would run to infinity. Each situation gets a plain message; fixing the parameter
 * clears it. The situations are built by hand, so the expected verdicts are known without the code.
 */
import { describe, expect, it } from 'vitest';
import { buildEffects } from '../../server/engine/effects';
import { checkModelData, type ParameterPlan } from '../../server/engine/estimate';
import { JACCARD_CAUTION } from '../../shared/data';

const n = 5;
function net(edges: [number, number][]): Uint8Array {
  const a = new Uint8Array(n * n);
  for (const [i, j] of edges) a[i * n + j] = 1;
  return a;
}
const est: ParameterPlan = { estimate: true };
const fixed = (value: number): ParameterPlan => ({ estimate: false, value });

describe('checkModelData', () => {
  const w1 = net([[0, 1], [1, 2], [2, 3], [3, 4]]);
  const w2 = net([[0, 1], [1, 2], [2, 3], [4, 0], [0, 2]]); // no mutual dyad, one transitive triplet 0->1->2 with 0->2
  const effects = buildEffects([{ id: 'density' }, { id: 'reciprocity' }, { id: 'transitive_triplets' }, { id: 'three_cycles' }]);

  it('refuses a period with no change when its rate is estimated, and accepts it fixed', () => {
    const periods = [
      { start: w1, end: w1, effects },
      { start: w1, end: w2, effects },
    ];
    const notes = checkModelData(periods, [est, est], [est, fixed(0), fixed(0), fixed(0)], ['spring to summer', 'summer to autumn']);
    const zero = notes.filter((x) => x.code === 'zero_change');
    expect(zero).toHaveLength(1);
    expect(zero[0]).toMatchObject({ severity: 'error', path: 'rates.0' });
    expect(zero[0].message).toMatch(/No tie changes between spring to summer.*Fix this rate.*leave the period out/);
    const ok = checkModelData(periods, [fixed(0.1), est], [est, fixed(0), fixed(0), fixed(0)]);
    expect(ok.filter((x) => x.code === 'zero_change')).toHaveLength(0);
  });

  it('refuses reciprocity and three-cycles estimated when no end wave has any, not when fixed', () => {
    const periods = [{ start: w1, end: w2, effects }];
    const notes = checkModelData(periods, [est], [est, est, est, est]);
    const bound = notes.filter((x) => x.code === 'at_bound').map((x) => x.path);
    // w2 has no mutual dyad (reciprocity) and no three-cycle; it has one transitive triplet.
    expect(bound).toEqual(['effects.1', 'effects.3']);
    expect(notes.find((x) => x.path === 'effects.1')!.message).toMatch(/No tie is returned.*minus infinity/);
    const fixedNotes = checkModelData(periods, [est], [est, fixed(0.5), est, fixed(0)]);
    expect(fixedNotes.filter((x) => x.code === 'at_bound')).toHaveLength(0);
  });

  it('refuses a model without the density effect', () => {
    const noDensity = buildEffects([{ id: 'reciprocity' }]);
    const notes = checkModelData([{ start: w1, end: w2, effects: noDensity }], [est], [est]);
    expect(notes.some((x) => x.code === 'no_density' && x.severity === 'error')).toBe(true);
  });

  it('warns (does not refuse) when almost every pair changes', () => {
    const all: [number, number][] = [];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j) all.push([i, j]);
    const densityOnly = buildEffects([{ id: 'density' }]);
    const notes = checkModelData([{ start: net([]), end: net(all.slice(0, 19)), effects: densityOnly }], [est], [est]);
    expect(notes.find((x) => x.code === 'large_change')?.severity).toBe('warning');
    expect(notes.some((x) => x.severity === 'error')).toBe(false);
  });

  it('warns about low turnover overlap below the shared Jaccard threshold, not on it (ties counted by hand)', () => {
    // Snijders, van de Bunt & Steglich (2010): a wave-to-wave Jaccard index below about 0.2 is a
    // caution (from memory); the threshold is the one the data summaries use.
    expect(JACCARD_CAUTION).toBe(0.2);
    const densityOnly = buildEffects([{ id: 'density' }]);
    const start = net([[0, 1], [1, 2], [2, 3]]);
    const low = (end: Uint8Array) =>
      checkModelData([{ start, end, effects: densityOnly }], [est], [est]).filter((x) => x.code === 'low_jaccard');
    // 1 stable of 5 in either wave: J = 0.2 exactly, no warning.
    expect(low(net([[0, 1], [3, 4], [4, 0]]))).toHaveLength(0);
    // 1 stable of 6: J = 1/6, a warning that names the threshold.
    const below = low(net([[0, 1], [3, 4], [4, 0], [0, 2]]));
    expect(below).toHaveLength(1);
    expect(below[0]).toMatchObject({ severity: 'warning', path: 'rates.0' });
    expect(below[0].message).toMatch(/Only 17% of the ties .* below about 20%/);
    // 2 stable of 5: J = 0.4, no warning.
    expect(low(net([[0, 1], [1, 2], [4, 0], [0, 2]]))).toHaveLength(0);
  });
});
