/**
 * Estimator benchmarks (figures printed, never pass/fail):
 * 1. A four-effect model (density, reciprocity, transitive triplets, covariate similarity) on 50 actors
 *    and three waves simulated from known values: time to fit on one core (this thread, no workers),
 *    simulated periods used, convergence; then a second round from the estimates, as a user would run
 *    it when the first does not meet the thresholds (target: under 60 s).
 * 2. A small coverage study: many datasets simulated from the same values (n = 30, three waves), each
 *    fitted (a second round when the first is not converged); the share of 95% intervals
 *    estimate +- 1.96 SE that cover the true value, per parameter. Nominal 0.95 (Snijders 2001,
 *    The statistical evaluation of social network dynamics, Sociological Methodology 31: the
 *    estimator's asymptotic normality); with D datasets its Monte Carlo error is about sqrt(.95 .05 / D).
 *
 * Set BENCH_COVERAGE_DATASETS to change the number of datasets (default 20).
 */
import { fitSaom, type SaomFit, type SaomProblemInput } from '../server/engine/estimate';
import { simulatedPanel, TRUE_BETA, TRUE_EFFECTS } from '../tests/estimate/fixtures';
import type { BenchSection } from './engine';

const TRUE_RATE = 4;

function inputFor(n: number, dataSeed: number, seed: number): SaomProblemInput {
  const { periods } = simulatedPanel(n, dataSeed, { rate: TRUE_RATE });
  return {
    n,
    periods,
    rates: periods.map(() => ({ estimate: true })),
    params: TRUE_BETA.map(() => ({ estimate: true })),
    seed,
  };
}

function timed<T>(fn: () => T): { value: T; seconds: number } {
  const t0 = performance.now();
  const value = fn();
  return { value, seconds: (performance.now() - t0) / 1000 };
}

const f3 = (x: number | null) => (x == null ? '   —  ' : (x >= 0 ? ' ' : '') + x.toFixed(3));

function describeFit(print: (line: string) => void, fit: SaomFit, seconds: number, label: string): void {
  const maxT = Math.max(...fit.raw.convergenceT.map(Math.abs));
  print(
    `${label}: ${seconds.toFixed(1)} s, ${fit.simulatedPeriods.toLocaleString('en-GB')} simulated periods ` +
      `(Phase 2 iterations ${fit.phase2Iterations.join(', ')}), max |t| ${maxT.toFixed(3)}, tau_max ${fit.tauMax.toFixed(3)}, ` +
      `${fit.converged ? 'converged' : 'not converged'}`,
  );
}

const fitSection: BenchSection = {
  name: 'estimator: four effects, 50 actors, three waves (one core)',
  run(print) {
    const input = inputFor(50, 2024, 77);
    const ties = input.periods.map((p) => p.end.reduce((s, v) => s + v, 0));
    print(`Data: simulated at rate ${TRUE_RATE} with ${TRUE_EFFECTS.join(', ')} = ${TRUE_BETA.join(', ')}; ties at waves 2 and 3: ${ties.join(', ')}.`);
    const first = timed(() => fitSaom(input, { phase3Runs: 500 }));
    describeFit(print, first.value, first.seconds, 'Round 1');
    const second = timed(() =>
      fitSaom({ ...input, seed: 78 }, { phase3Runs: 500, start: first.value.raw.theta, initialDerivative: first.value.raw.derivative }),
    );
    describeFit(print, second.value, second.seconds, 'Round 2 (from round 1)');
    print('parameter                       true   estimate     SE   conv. t');
    const truth = [TRUE_RATE, TRUE_RATE, ...TRUE_BETA];
    second.value.parameters.forEach((q, k) => {
      print(`${q.label.padEnd(30)} ${f3(truth[k])}   ${f3(q.value)}  ${f3(q.se)}  ${f3(q.convergenceT)}`);
    });
    print(`Total for both rounds: ${(first.seconds + second.seconds).toFixed(1)} s (target under 60 s).`);
  },
};

const coverageSection: BenchSection = {
  name: 'estimator: coverage of 95% intervals (n = 30, three waves)',
  run(print) {
    const datasets = Number(process.env.BENCH_COVERAGE_DATASETS ?? 20);
    const names = ['rate 1', 'rate 2', ...TRUE_EFFECTS];
    const truth = [TRUE_RATE, TRUE_RATE, ...TRUE_BETA];
    const covered = new Array<number>(truth.length).fill(0);
    const counted = new Array<number>(truth.length).fill(0);
    let failures = 0;
    let secondRounds = 0;
    let converged = 0;
    const t0 = performance.now();
    for (let d = 0; d < datasets; d++) {
      const input = inputFor(30, 10_000 + d, 500 + d);
      try {
        let fit = fitSaom(input, { phase3Runs: 500 });
        if (!fit.converged) {
          secondRounds++;
          fit = fitSaom({ ...input, seed: 900 + d }, { phase3Runs: 500, start: fit.raw.theta, initialDerivative: fit.raw.derivative });
        }
        if (fit.converged) converged++;
        fit.parameters.forEach((q, k) => {
          if (q.se == null) return;
          counted[k]++;
          if (Math.abs(q.value - truth[k]) <= 1.96 * q.se) covered[k]++;
        });
      } catch (e) {
        failures++;
        print(`dataset ${d}: ${(e as Error).message}`);
      }
    }
    const seconds = (performance.now() - t0) / 1000;
    print(`${datasets} datasets in ${seconds.toFixed(0)} s; ${secondRounds} needed a second round; ${converged} converged; ${failures} failed.`);
    const mcError = Math.sqrt((0.95 * 0.05) / Math.max(1, datasets));
    names.forEach((name, k) => {
      print(`${name.padEnd(22)} covered ${covered[k]}/${counted[k]} = ${(covered[k] / Math.max(1, counted[k])).toFixed(2)}`);
    });
    const all = covered.reduce((s, v) => s + v, 0) / Math.max(1, counted.reduce((s, v) => s + v, 0));
    print(`All parameters: ${all.toFixed(3)} (nominal 0.95; Monte Carlo error per parameter about ${mcError.toFixed(2)}).`);
  },
};

export const estimateSections: BenchSection[] = [fitSection, coverageSection];

// Run on its own: npx tsx bench/estimate.ts
if (/[\\/]bench[\\/]estimate\.ts$/.test(process.argv[1] ?? '')) {
  void (async () => {
    for (const s of estimateSections) {
      console.log(`\n## ${s.name}`);
      const t = performance.now();
      await s.run((line) => console.log(line));
      console.log(`(${((performance.now() - t) / 1000).toFixed(1)} s)`);
    }
  })();
}
