/**
 * Ties of a consensus network against the observed wave: matched (in both), missed (observed, not in
 * the consensus) and extra (in the consensus, not observed). Pure, so it is tested without a screen.
 */
export type TieKind = 'matched' | 'missed' | 'extra';

export interface ClassifiedTie {
  from: number;
  to: number;
  kind: TieKind;
  /** Share of simulated networks with this tie (null for a missed tie below the threshold). */
  frequency: number | null;
  /** The reverse tie is drawn too (so the two are drawn side by side). */
  mutual: boolean;
}

export function classifyTies(consensus: Array<[number, number, number]>, observed: Array<[number, number]>): ClassifiedTie[] {
  const key = (a: number, b: number) => `${a}>${b}`;
  const obs = new Set(observed.map(([a, b]) => key(a, b)));
  const cons = new Map(consensus.map(([a, b, f]) => [key(a, b), f]));
  const out: ClassifiedTie[] = [];
  for (const [a, b, f] of consensus) out.push({ from: a, to: b, kind: obs.has(key(a, b)) ? 'matched' : 'extra', frequency: f, mutual: false });
  for (const [a, b] of observed) if (!cons.has(key(a, b))) out.push({ from: a, to: b, kind: 'missed', frequency: null, mutual: false });
  const drawn = new Set(out.map((t) => key(t.from, t.to)));
  for (const t of out) t.mutual = drawn.has(key(t.to, t.from));
  return out;
}

export function countKinds(ties: ClassifiedTie[]): Record<TieKind, number> {
  const c: Record<TieKind, number> = { matched: 0, missed: 0, extra: 0 };
  for (const t of ties) c[t.kind]++;
  return c;
}
