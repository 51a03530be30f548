/**
 * The lineup test's arithmetic and its seeded plan.
 * - The lineup p-value P(Binomial(K, 1/m) >= x) (Majumder, Hofmann & Cook 2013, JASA 108:942-956) is
 *   checked against scipy.stats.binom.sf (Debian's scipy, via /usr/bin/python3) for several (K, x, m).
 * - The observed panel's position must be uniform over the m panels (Buja et al. 2009, Phil. Trans. R.
 *   Soc. A 367:4361-4383: the observed plot is placed at random): a chi-square goodness-of-fit test over
 *   2000 seeded lineups, with the statistic's tail from scipy.stats.chi2.sf.
 * - The m - 1 simulated chains are distinct, and the same seed gives the same plan.
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { lineupFloor, lineupPlan, lineupPValue } from '../../server/engine/gof/lineup';
import { deriveSeed } from '../../server/engine/prng';
import { runPython } from './python';

const REF = join(__dirname, '../reference/binom_tail.py');

describe('lineup p-value', () => {
  it('equals scipy.stats.binom.sf(x - 1, K, 1/m) for several (K, x, m)', () => {
    const cases: [number, number, number][] = [
      [1, 1, 20],
      [1, 0, 20],
      [5, 1, 20],
      [5, 2, 20],
      [5, 5, 20],
      [10, 3, 20],
      [12, 4, 10],
      [30, 2, 20],
      [30, 12, 20],
      [50, 7, 6],
      [3, 2, 2],
      [100, 40, 20],
    ];
    const scipy = runPython<number[]>(REF, cases);
    cases.forEach(([K, x, m], i) => {
      const ours = lineupPValue(K, x, m);
      expect(Math.abs(ours - scipy[i]) / Math.max(scipy[i], 1e-300), `K=${K} x=${x} m=${m}`).toBeLessThan(1e-9);
    });
  });

  it('all K correct gives the floor (1/m)^K; bad counts are refused', () => {
    expect(lineupPValue(4, 4, 20)).toBeCloseTo(lineupFloor(4, 20), 15);
    expect(() => lineupPValue(3, 4, 20)).toThrow(/between 0 and 3/);
    expect(() => lineupPValue(3, 1, 1)).toThrow(/at least 2 panels/);
  });
});

describe('lineup plan', () => {
  it('puts the observed panel uniformly over the m panels (chi-square test, scipy tail)', () => {
    const m = 20;
    const lineups = 2000;
    const counts = new Array<number>(m).fill(0);
    for (let k = 0; k < lineups; k++) counts[lineupPlan(deriveSeed(4242, k), m, 100).observedPanel]++;
    const expected = lineups / m;
    const chi2 = counts.reduce((s, c) => s + (c - expected) ** 2 / expected, 0);
    const out = spawnSync('/usr/bin/python3', ['-c', `from scipy.stats import chi2; print(chi2.sf(${chi2}, ${m - 1}))`], { encoding: 'utf8' });
    const p = Number(out.stdout.trim());
    expect(Number.isFinite(p)).toBe(true);
    expect(p).toBeGreaterThan(0.001);
  });

  it('the chi-square check can fail: a plan that always puts the observed panel first is rejected', () => {
    const m = 20;
    const counts = new Array<number>(m).fill(0);
    counts[0] = 2000;
    const expected = 100;
    const chi2 = counts.reduce((s, c) => s + (c - expected) ** 2 / expected, 0);
    const out = spawnSync('/usr/bin/python3', ['-c', `from scipy.stats import chi2; print(chi2.sf(${chi2}, ${m - 1}))`], { encoding: 'utf8' });
    expect(Number(out.stdout.trim())).toBeLessThan(1e-6);
  });

  it('draws m - 1 distinct chains, marks the observed panel, and repeats itself for the same seed', () => {
    const a = lineupPlan(77, 20, 25);
    expect(a.chainOfPanel).toHaveLength(20);
    expect(a.chainOfPanel[a.observedPanel]).toBe(-1);
    const sims = a.chainOfPanel.filter((c) => c >= 0);
    expect(new Set(sims).size).toBe(19);
    expect(sims.every((c) => c < 25)).toBe(true);
    expect(lineupPlan(77, 20, 25)).toEqual(a);
    expect(lineupPlan(78, 20, 25)).not.toEqual(a);
    expect(() => lineupPlan(1, 20, 10)).toThrow(/at least 19 simulated chains/);
  });
});
