/**
 * Checks of the command line (server/cli) and of the network CSV parser it uses
 * (server/engine/io/csv-network.ts): good files give the statistics of METHODS.md 7d, bad files and bad
 * specifications exit non-zero with a clear message.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIO } from '../../server/cli/commands';
import { parseNetworkCsv } from '../../server/engine/io/csv-network';

const dir = mkdtempSync(path.join(tmpdir(), 'wavefit-cli-'));
function file(name: string, text: string): string {
  const p = path.join(dir, name);
  writeFileSync(p, text);
  return p;
}

function run(args: string[]): { code: number; out: string; err: string } {
  let out = '';
  let err = '';
  const io: CliIO = { stdout: (t) => (out += t), stderr: (t) => (err += t), readFile: (p) => readFileSync(p, 'utf8') };
  const code = runCli(args, io);
  return { code, out, err };
}

// METHODS.md 7d worked example, with invented crew names of the Harbourside rescue station.
const names = ['Maren', 'Tobias', 'Ines', 'Kofi', 'Lotte'];
const edges: [number, number][] = [[0, 1], [1, 0], [1, 2], [2, 3], [3, 1], [0, 3], [4, 0]];
const edgeCsv = 'sender,receiver\n' + edges.map(([i, j]) => `${names[i]},${names[j]}`).join('\n') + '\n';
const matrixCsv =
  ',' + names.join(',') + '\n' +
  names.map((a, i) => a + ',' + names.map((_, j) => (edges.some(([s, r]) => s === i && r === j) ? 1 : 0)).join(',')).join('\r\n');

describe('cli stats', () => {
  it('gives the METHODS 7d counts for the worked example, as an edge list and as a matrix', () => {
    for (const [name, text] of [['edges.csv', edgeCsv], ['matrix.csv', matrixCsv]]) {
      const r = run(['stats', file(name, text), '--max-distance', '4']);
      expect(r.code, r.err).toBe(0);
      const json = JSON.parse(r.out);
      expect(json.n).toBe(5);
      expect(json.actors).toEqual(names);
      expect(json.ties).toBe(7);
      const triads = json.statistics.triad_census;
      const at = (l: string) => triads.values[triads.labels.indexOf(l)];
      expect([at('012'), at('021U'), at('021C'), at('111D'), at('111U'), at('030C'), at('120C'), at('003')]).toEqual([4, 1, 1, 1, 1, 1, 1, 0]);
      expect(json.statistics.dyad_census.values.slice(0, 3)).toEqual([1, 5, 4]);
      expect(json.statistics.geodesic_distribution.values).toEqual([7, 14, 16, 16, 4]);
    }
  });

  const bad: [string, string, RegExp][] = [
    ['self-tie in an edge list', 'sender,receiver\nMaren,Maren\n', /line 2: self-tie "Maren" -> "Maren"/],
    ['self-tie on a matrix diagonal', ',a,b\na,1,0\nb,1,0\n', /line 2: self-tie on the diagonal for actor "a"/],
    ['a value that is not 0/1', ',a,b\na,0,2\nb,1,0\n', /value "2" in row "a", column "b" is not 0 or 1/],
    ['a missing value', ',a,b\na,0,NA\nb,1,0\n', /value "NA" in row "a", column "b" is not 0 or 1/],
    ['too few rows', ',a,b,c\na,0,1,0\nb,1,0,0\n', /the matrix is not square: 3 actor columns but 2 actor rows/],
    ['a short row', ',a,b,c\na,0,1\nb,1,0,0\nc,0,0,0\n', /the matrix is not square: row "a" has 2 values for 3 actors/],
    ['an unknown row label', ',a,b\na,0,1\nz,1,0\n', /row label "z" is not among the column labels/],
    ['a three-cell edge row', 'x,y\nx\n', /line 2: an edge list row has two cells/],
    ['an empty file', '', /the file is empty/],
    ['an unclosed quote', 'a,"b\n', /a quoted cell is not closed/],
  ];
  for (const [what, text, message] of bad) {
    it(`exits non-zero with a clear message for ${what}`, () => {
      const r = run(['stats', file(`bad-${what.replace(/\W+/g, '-')}.csv`, text)]);
      expect(r.code).toBe(1);
      expect(r.out).toBe('');
      expect(r.err).toMatch(/^wavefit cli: error: csv-network: /);
      expect(r.err).toMatch(message);
    });
  }

  it('reports a missing file, unknown options and commands', () => {
    expect(run(['stats', path.join(dir, 'nope.csv')]).err).toMatch(/cannot read .*nope.csv/);
    expect(run(['stats', file('ok.csv', edgeCsv), '--max-degree', 'x']).err).toMatch(/--max-degree needs a whole number, got "x"/);
    expect(run(['stats', file('ok.csv', edgeCsv), '--colour']).code).toBe(1);
    expect(run(['frobnicate']).code).toBe(2);
  });

  it('as a real process: success prints JSON, bad input exits 1 with the message on stderr', () => {
    const tsx = path.resolve(__dirname, '../../node_modules/.bin/tsx');
    const main = path.resolve(__dirname, '../../server/cli/main.ts');
    const ok = JSON.parse(execFileSync(tsx, [main, 'stats', file('ok.csv', edgeCsv)], { encoding: 'utf8' }));
    expect(ok.ties).toBe(7);
    const r = spawnSync(tsx, [main, 'stats', file('selftie.csv', ',a,b\na,0,1\nb,0,1\n')], { encoding: 'utf8' });
    expect(r.status).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/csv-network: line 3: self-tie on the diagonal for actor "b"/);
  });
});

describe('cli simulate', () => {
  const spec = {
    actors: names,
    start: [['Maren', 'Tobias'], { sender: 'Tobias', receiver: 'Ines' }],
    covariates: {
      years: { type: 'numeric', values: [1, 5, null, 3, 8] },
      crew: { type: 'categorical', values: ['boat', 'shore', 'boat', null, 'shore'] },
    },
    effects: [
      { id: 'density', parameter: -1.2 },
      { id: 'reciprocity', parameter: 1 },
      { id: 'covariate_similarity', covariate: 'years', parameter: 0.5 },
      { id: 'same_covariate', covariate: 'crew', parameter: 0.4 },
    ],
    rate: 3,
    chains: 3,
    seed: 17,
    statistics: { maxDegree: 3, maxDistance: 2 },
  };

  it('runs the chains reproducibly and reports consistent statistics', () => {
    const a = run(['simulate', file('spec.json', JSON.stringify(spec))]);
    expect(a.code, a.err).toBe(0);
    const b = run(['simulate', file('spec.json', JSON.stringify(spec))]);
    expect(b.out).toBe(a.out);
    const json = JSON.parse(a.out);
    expect(json.chains).toHaveLength(3);
    for (const c of json.chains) {
      expect(c.targets.density).toBe(c.ties);
      expect(c.statistics.outdegree_distribution.values[3]).toBeLessThanOrEqual(5);
      const d = c.statistics.dyad_census.values;
      expect(2 * d[0] + d[1]).toBe(c.ties);
      expect(c.statistics.triad_census.values.reduce((x: number, y: number) => x + y, 0)).toBe(10);
    }
    const other = run(['simulate', file('spec2.json', JSON.stringify({ ...spec, seed: 18 }))]);
    expect(other.out).not.toBe(a.out);
  });

  const badSpecs: [string, unknown, RegExp][] = [
    ['an unknown effect', { ...spec, effects: [{ id: 'popularity', parameter: 1 }] }, /invalid specification: effects\.0\.id/],
    ['a negative rate', { ...spec, rate: -2 }, /invalid specification: rate/],
    ['a start tie to an unknown actor', { ...spec, start: [['Maren', 'Nobody']] }, /start tie 1: "Nobody" is not among the actors/],
    ['a self-tie in the start network', { ...spec, start: [['Ines', 'Ines']] }, /start tie 1: self-tie/],
    ['a covariate of the wrong length', { ...spec, covariates: { ...spec.covariates, years: { type: 'numeric', values: [1, 2] } } }, /covariate "years" has 2 values for 5 actors/],
    ['a categorical covariate for a numeric effect', { ...spec, effects: [{ id: 'covariate_ego', covariate: 'crew', parameter: 1 }] }, /effects: covariate_ego needs a numeric covariate, but "crew" is categorical/],
    ['a missing seed', { ...spec, seed: undefined }, /invalid specification: seed/],
    ['an unknown field', { ...spec, colour: 'teal' }, /invalid specification: .*colour/],
  ];
  for (const [what, s, message] of badSpecs) {
    it(`exits non-zero with a clear message for ${what}`, () => {
      const r = run(['simulate', file('bad-spec.json', JSON.stringify(s))]);
      expect(r.code).toBe(1);
      expect(r.out).toBe('');
      expect(r.err).toMatch(message);
    });
  }

  it('rejects a file that is not JSON', () => {
    const r = run(['simulate', file('broken.json', '{"actors": [')]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/is not valid JSON/);
  });
});

describe('csv-network parser', () => {
  it('reads quoted labels, tabs, a byte-order mark and Windows line ends, and warns on duplicate ties', () => {
    const p = parseNetworkCsv('\ufefffrom\tto\r\n"Harbour, Jo"\tKai\r\nKai\t"Harbour, Jo"\r\nKai\t"Harbour, Jo"\r\n');
    expect(p.actors).toEqual(['Harbour, Jo', 'Kai']);
    expect(Array.from(p.adj)).toEqual([0, 1, 1, 0]);
    expect(p.warnings).toHaveLength(1);
  });

  it('orders actors by a given list (isolates included) and refuses labels outside it', () => {
    const p = parseNetworkCsv('a,b\n', { actors: ['c', 'b', 'a'] });
    expect(p.n).toBe(3);
    expect(p.adj[2 * 3 + 1]).toBe(1);
    expect(() => parseNetworkCsv('a,z\n', { actors: ['a', 'b'] })).toThrow(/csv-network: line 1: actor "z" is not one of the study's actors/);
    const m = parseNetworkCsv(',a,b\na,0,1\nb,0,0\n', { actors: ['b', 'a'] });
    expect(Array.from(m.adj)).toEqual([0, 0, 1, 0]);
  });
});
