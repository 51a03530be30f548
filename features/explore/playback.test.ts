/**
 * Playback logic (features/explore/playback.ts) against a brute-force rebuild of the network from the
 * start ties, step by step; the plain-words factor against e^c (common practice: a logit term's odds ratio).
 */
import { describe, expect, it } from 'vitest';
import type { ReplayResponse } from '../../shared/explore';
import { frameOf, mergedTimes, stepBack, stepForward, stepsAtTime, trackOf } from './playback';
import { factorWords, optionSentences } from './words';

function fakeReplay(): ReplayResponse {
  // 3 actors; start 0->1; observed end 0->1, 1->0, 2->0.
  return {
    batchId: 1, period: 1, chain: 1, chains: 1, actors: ['Ana', 'Ben', 'Cy'], positions: [[0, 0], [1, 0], [0, 1]],
    startTies: [[0, 1]], observedEndTies: [[0, 1], [1, 0], [2, 0]], unobservedEnd: [],
    steps: { t: [0.1, 0.2, 0.35, 0.5, 0.9], actor: [1, 2, 0, 2, 1], alter: [0, -1, 1, 0, 2], sign: [1, 0, -1, 1, 1] },
    ministeps: 5, changes: 4, distanceStart: 2, distanceEnd: 2, matchesStored: true, rate: 1,
  };
}

describe('explore playback', () => {
  it('counts and distance after every step equal a brute-force rebuild', () => {
    const r = fakeReplay();
    const track = trackOf(r);
    const end = new Set(['0-1', '1-0', '2-0']);
    const x = new Set(['0-1']);
    const dist = () => {
      let d = 0;
      for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) if (i !== j && x.has(`${i}-${j}`) !== end.has(`${i}-${j}`)) d++;
      return d;
    };
    expect(track.distance[0]).toBe(dist());
    let changes = 0;
    let none = 0;
    for (let s = 0; s < 5; s++) {
      const j = r.steps.alter[s];
      if (j < 0) none++;
      else {
        changes++;
        const key = `${r.steps.actor[s]}-${j}`;
        if (x.has(key)) x.delete(key);
        else x.add(key);
      }
      const f = frameOf(track, s + 1);
      expect(f.changes).toBe(changes);
      expect(f.noChange).toBe(none);
      expect(f.distance).toBe(dist());
      for (let i = 0; i < 3; i++) for (let jj = 0; jj < 3; jj++) expect(f.adj[i * 3 + jj]).toBe(x.has(`${i}-${jj}`) ? 1 : 0);
    }
    expect(track.distance[5]).toBe(r.distanceEnd);
    expect(frameOf(track, 5).recent[0]).toEqual({ from: 1, to: 2, sign: 1, step: 4 });
    expect(frameOf(track, 0).last).toBeNull();
  });

  it('the clock: time to steps, and stepping forward and back over the merged stops', () => {
    const track = trackOf(fakeReplay());
    expect(stepsAtTime(track, 0)).toBe(0);
    expect(stepsAtTime(track, 0.1)).toBe(1);
    expect(stepsAtTime(track, 0.49)).toBe(3);
    expect(stepsAtTime(track, 1)).toBe(5);
    const times = mergedTimes([track]);
    expect(stepForward(times, 0)).toBe(0.1);
    expect(stepForward(times, 0.1)).toBe(0.2);
    expect(stepForward(times, 0.9)).toBe(1);
    expect(stepBack(times, 0.2)).toBe(0.1);
    expect(stepBack(times, 0.1)).toBe(0);
    expect(stepBack(times, 0.3)).toBe(0.1);
    expect(stepBack(times, 1)).toBe(0.9);
  });

  it('plain words use e^c', () => {
    expect(factorWords(1.5)).toBe('4.5 times more likely');
    expect(factorWords(-Math.log(2))).toBe('2.0 times less likely');
    const s = optionSentences(
      { alter: 0, tie: 0, tieBack: 1, probability: 0.4, utility: -0.7, contributions: [-2.2, 1.5] },
      [{ key: 'density', label: 'Outdegree (density)' }, { key: 'reciprocity', label: 'Reciprocity' }],
      ['Mira'],
    );
    expect(s).toEqual(['Outdegree (density) makes choosing Mira back 9.0 times less likely.', 'Reciprocity makes choosing Mira back 4.5 times more likely.']);
  });
});
