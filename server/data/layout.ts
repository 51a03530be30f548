/**
 * A seeded force-directed layout (ForceAtlas2, from graphology-layout-forceatlas2), started from a
 * seeded random placement (server/engine/prng.ts), so the same seed always gives the same picture.
 * Used by the waves screen (one layout for every wave of a study) and the consensus view
 * (server/review/layout.ts).
 *
 * References: Jacomy, Venturini, Heymann & Bastian (2014) ForceAtlas2, a continuous graph layout
 * algorithm for handy network visualization, PLoS ONE 9(6): e98853.
 */
import Graph from 'graphology';
import forceAtlas2 from 'graphology-layout-forceatlas2';
import { streamFor } from '../engine/prng';

/** Positions in [0, 1] x [0, 1] for n nodes and directed ties (treated as undirected springs). */
export function seededLayout(n: number, ties: Array<[number, number]>, seed: number, iterations = 300): Array<[number, number]> {
  if (n === 0) return [];
  if (n === 1) return [[0.5, 0.5]];
  const rng = streamFor(seed, 0x1a);
  const graph = new Graph({ type: 'undirected', multi: false });
  for (let i = 0; i < n; i++) graph.addNode(String(i), { x: rng.nextDouble() * 100, y: rng.nextDouble() * 100 });
  for (const [a, b] of ties) {
    if (a !== b && !graph.hasEdge(String(a), String(b))) graph.addEdge(String(a), String(b));
  }
  const settings = forceAtlas2.inferSettings(graph);
  const positions = forceAtlas2(graph, { iterations, settings: { ...settings, gravity: 1, scalingRatio: 4, strongGravityMode: true } });
  const xs = Array.from({ length: n }, (_, i) => positions[String(i)].x);
  const ys = Array.from({ length: n }, (_, i) => positions[String(i)].y);
  const [x0, x1, y0, y1] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
  const span = Math.max(x1 - x0, y1 - y0) || 1;
  // Keep the aspect ratio; centre the shorter side.
  const dx = (span - (x1 - x0)) / 2;
  const dy = (span - (y1 - y0)) / 2;
  return xs.map((x, i) => [(x - x0 + dx) / span, (ys[i] - y0 + dy) / span]);
}
