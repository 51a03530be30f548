/**
 * Tie frequencies: how often each ordered pair is a tie in the simulated end networks of a period.
 *
 * Purpose: keep only n x n counts per period (never full chain histories), add chains one by one or
 * merge counts from several workers; counts are integers, so the order of adding does not matter.
 *
 * References:
 * - Wavefit METHODS.md section 6 (tie frequency f_ij = (1/N) sum_s X^(s)_ij; our own device).
 */

export class TieFrequencies {
  readonly n: number;
  /** counts[i*n+j] = number of added networks with the tie i->j. */
  readonly counts: Int32Array;
  /** Number of networks added. */
  networks: number;
  /** Sum over added networks of their tie counts (for the mean simulated tie count). */
  tieTotal: number;

  constructor(n: number, counts?: Int32Array, networks = 0, tieTotal = 0) {
    if (!Number.isInteger(n) || n < 0) throw new Error(`tie-frequencies: n must be a non-negative integer, got ${String(n)}`);
    if (counts && counts.length !== n * n) {
      throw new Error(`tie-frequencies: counts for ${n} actors need ${n * n} entries, got ${counts.length}`);
    }
    this.n = n;
    this.counts = counts ?? new Int32Array(n * n);
    this.networks = networks;
    this.tieTotal = tieTotal;
  }

  /** Add one network given as a row-major 0/1 adjacency matrix. */
  add(adj: ArrayLike<number>): void {
    const { n, counts } = this;
    if (adj.length !== n * n) throw new Error(`tie-frequencies: a network on ${n} actors has ${n * n} entries, got ${adj.length}`);
    let ties = 0;
    for (let k = 0; k < n * n; k++) {
      if (adj[k]) {
        counts[k]++;
        ties++;
      }
    }
    this.networks++;
    this.tieTotal += ties;
  }

  /** Add the counts of another accumulator over the same actors. */
  merge(other: TieFrequencies): void {
    if (other.n !== this.n) throw new Error(`tie-frequencies: cannot merge counts for ${other.n} actors into ${this.n}`);
    for (let k = 0; k < this.counts.length; k++) this.counts[k] += other.counts[k];
    this.networks += other.networks;
    this.tieTotal += other.tieTotal;
  }

  /** f_ij = count / networks (0 when nothing was added). */
  frequency(i: number, j: number): number {
    return this.networks === 0 ? 0 : this.counts[i * this.n + j] / this.networks;
  }

  /** The mean number of ties per added network. */
  meanTies(): number {
    return this.networks === 0 ? 0 : this.tieTotal / this.networks;
  }
}
