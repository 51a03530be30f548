/**
 * The demo study's data: advice ties among 24 crew members of the (invented) Harbourside volunteer
 * sea-rescue station, asked three times over one season, with their years of service, watch team,
 * skipper certificate and drills attended. Generated, not observed: wave 1 is a seeded random network
 * leaning towards one's own watch; waves 2 and 3 are simulated with the engine's simulatePeriod from
 * the wave before, under density, reciprocity, transitive triplets and same-watch effects.
 * The output is CSV text in the upload format (shared/data.ts), so the seed goes through the same
 * parser and store as a real upload.
 */
import { buildEffects } from '../engine/effects';
import { createRng, streamFor } from '../engine/prng';
import { simulatePeriod } from '../engine/simulate';
import type { DataUploadBody } from '../../shared/data';

export const DEMO_SEED = 20_240_611;

export const DEMO_CREW = [
  'Ari', 'Bex', 'Cato', 'Dara', 'Eli', 'Finn', 'Gus', 'Hana', 'Ivo', 'Jun', 'Kit', 'Lina',
  'Milo', 'Nell', 'Oren', 'Pia', 'Quin', 'Rafe', 'Sol', 'Tove', 'Uma', 'Vic', 'Wren', 'Yara',
] as const;

export const DEMO_WATCHES = ['Heron', 'Kestrel', 'Puffin'] as const;
export const DEMO_WAVE_LABELS = ['spring', 'midsummer', 'early autumn'] as const;

/** Model used to move from one wave to the next (parameters in the order of the effect list). */
export const DEMO_MODEL = {
  effects: [
    { id: 'density' as const },
    { id: 'reciprocity' as const },
    { id: 'transitive_triplets' as const },
    { id: 'same_covariate' as const, covariate: 'watch' },
  ],
  params: [-2.2, 1.6, 0.3, 0.9],
  rate: 2.5,
};

export interface DemoData {
  actors: string[];
  watch: string[];
  years: number[];
  skipper: number[];
  drills: number[][];
  /** Row-major 0/1 matrices, one per wave. */
  waves: Uint8Array[];
}

export function generateDemoData(seed = DEMO_SEED): DemoData {
  const n = DEMO_CREW.length;
  const rng = createRng(seed);
  const watchCode = Int32Array.from({ length: n }, (_, i) => i % DEMO_WATCHES.length);
  const years = Array.from({ length: n }, () => 1 + rng.nextInt(22));
  const skipper = years.map((y) => (y >= 8 && rng.nextDouble() < 0.6 ? 1 : 0));
  const drills = [0, 1, 2].map(() => Array.from({ length: n }, () => 2 + rng.nextInt(9)));

  // Wave 1: each member asks 2 to 4 others, twice as likely within the own watch.
  const first = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) {
    const asks = 2 + rng.nextInt(3);
    let made = 0;
    while (made < asks) {
      const j = rng.nextInt(n);
      if (j === i || first[i * n + j]) continue;
      if (watchCode[i] !== watchCode[j] && rng.nextDouble() < 0.5) continue;
      first[i * n + j] = 1;
      made++;
    }
  }

  const effects = buildEffects(DEMO_MODEL.effects, { watch: watchCode });
  const waves = [first];
  for (let period = 1; period <= 2; period++) {
    const result = simulatePeriod({
      start: waves[period - 1],
      rate: DEMO_MODEL.rate,
      effects,
      params: DEMO_MODEL.params,
      rng: streamFor(seed, period),
    });
    waves.push(Uint8Array.from(result.end.adj));
  }
  return {
    actors: [...DEMO_CREW],
    watch: Array.from(watchCode, (c) => DEMO_WATCHES[c]),
    years,
    skipper,
    drills,
    waves,
  };
}

/** The demo data as an upload body: one edge list per wave and an actors file. */
export function demoUpload(data: DemoData = generateDemoData()): DataUploadBody {
  const n = data.actors.length;
  const waves = data.waves.map((adjacency, k) => {
    const lines = ['sender,receiver'];
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) if (adjacency[i * n + j] === 1) lines.push(`${data.actors[i]},${data.actors[j]}`);
    }
    return { label: DEMO_WAVE_LABELS[k], fileName: `advice-wave${k + 1}.csv`, content: lines.join('\n') + '\n' };
  });
  const actorLines = ['label,years_of_service,watch,certified_skipper,drills@1,drills@2,drills@3'];
  data.actors.forEach((label, i) => {
    actorLines.push([label, data.years[i], data.watch[i], data.skipper[i], ...data.drills.map((d) => d[i])].join(','));
  });
  return {
    format: 'edgelist',
    waves,
    actors: { fileName: 'crew.csv', content: actorLines.join('\n') + '\n' },
  };
}
