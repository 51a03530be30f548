/**
 * Checks of the command line (server/cli) and of the network file reader it shares with the upload
 * (server/data/parse.ts parseNetworkFile, server/data/csv.ts): good files give the statistics of
 * METHODS.md 7d, bad files and bad specifications exit non-zero with a clear message, and the command
 * line and the upload accept and refuse the same files.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIO } from '../../server/cli/commands';
import { parseNetworkFile, parseUpload } from '../../server/data/parse';
import { dataUploadBodySchema, type DataFormat } from '../../shared/data';

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
    ['self-tie in an edge list', 'sender,receiver\nMaren,Maren\n', /line 2, column 2: Self-tie: "Maren" names themself/],
    ['self-tie on a matrix diagonal', ',a,b\na,1,0\nb,1,0\n', /line 2, column 2: Self-tie: the diagonal cell of "a" is 1/],
    ['a value that is not 0/1', ',a,b\na,0,2\nb,1,0\n', /line 2, column 3: The value "2" is not 0, 1 or the missing marker "NA"/],
    ['a missing value', ',a,b\na,0,NA\nb,1,0\n', /1 pair is missing \("NA"\); the command line computes statistics of complete networks only/],
    ['too few rows', ',a,b,c\na,0,1,0\nb,1,0,0\n', /The matrix is not square: the first row names 3 actors but 2 rows follow/],
    ['a short row', ',a,b,c\na,0,1\nb,1,0,0\nc,0,0,0\n', /line 2: The matrix is not square: this row has 2 values for 3 columns/],
    ['an unknown row label', ',a,b\na,0,1\nz,1,0\n', /line 3, column 1: The row label "z" differs from the column label "b"/],
    ['a one-cell edge row', 'x,y\nx\n', /line 2: Expected "sender,receiver" \(and optionally a value\); this line has 1 field/],
    ['an empty file', '', /The file is empty/],
    ['an unclosed quote', 'a,"b\n', /line 1, column 2: A quoted field is not closed/],
  ];
  for (const [what, text, message] of bad) {
    it(`exits non-zero with a clear message for ${what}`, () => {
      const r = run(['stats', file(`bad-${what.replace(/\W+/g, '-')}.csv`, text)]);
      expect(r.code).toBe(1);
      expect(r.out).toBe('');
      expect(r.err).toMatch(/^wavefit cli: error: \S+\.csv( line \d+(, column \d+)?)?: /);
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
    expect(r.stderr).toMatch(/selftie\.csv line 3, column 3: Self-tie: the diagonal cell of "b" is 1/);
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

describe('one network reader for the upload and the command line', () => {
  it('reads quoted labels, tabs, a byte-order mark and Windows line ends (RFC 4180 quoting, Shafranovich 2005)', () => {
    const r = parseNetworkFile('crew.csv', '\ufefffrom\tto\r\n"Harbour, Jo"\tKai\r\nKai\t"Harbour, Jo"\r\n', 'edgelist');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.network.actors).toEqual(['Harbour, Jo', 'Kai']);
    expect(Array.from(r.network.adjacency)).toEqual([0, 1, 1, 0]);
  });

  // Each file is read once by the command line (stats, told the format) and once as both waves of an
  // upload; either both accept it (with the same actors and ties) or both refuse it.
  const files: Array<[string, DataFormat, string, boolean]> = [
    ['an edge list with a header', 'edgelist', edgeCsv, true],
    ['an edge list without a header, semicolons', 'edgelist', 'Maren;Tobias\nTobias;Ines\n', true],
    ['an edge list with a value column', 'edgelist', 'a,b,1\nb,c,0\nc,a,1\n', true],
    ['quoted labels with a comma and a quote', 'edgelist', '"Hale, ""Mo""",Kai\nKai,"Hale, ""Mo"""\n', true],
    ['a matrix with an empty corner', 'matrix', matrixCsv, true],
    ['a matrix with a named corner, tab separated', 'matrix', 'id\ta\tb\na\t0\t1\nb\t1\t0\n', true],
    ['a duplicated tie', 'edgelist', 'a,b\na,b\n', false],
    ['a self-tie', 'edgelist', 'a,a\na,b\n', false],
    ['a quoted field over two lines', 'edgelist', 'a,"b\nc"\nb,a\n', false],
    ['text after a closing quote', 'edgelist', 'a,"b" x\nb,a\n', false],
    ['matrix rows in another order than the columns', 'matrix', ',a,b\nb,0,1\na,1,0\n', false],
    ['a matrix value that is not 0/1', 'matrix', ',a,b\na,0,x\nb,1,0\n', false],
    ['one actor only', 'matrix', ',a\na,0\n', false],
    ['an empty file', 'edgelist', '\n\n', false],
  ];
  for (const [what, format, text, accepted] of files) {
    it(`${accepted ? 'accepts' : 'refuses'} ${what} in both`, () => {
      const cli = run(['stats', file(`same-${what.replace(/\W+/g, '-')}.csv`, text), '--format', format]);
      const upload = parseUpload(
        dataUploadBodySchema.parse({ format, waves: [{ label: 'w1', content: text }, { label: 'w2', content: text }] }),
      );
      expect(cli.code === 0, cli.err).toBe(accepted);
      expect(upload.ok, JSON.stringify(upload.ok ? null : upload.details)).toBe(accepted);
      if (upload.ok) {
        const json = JSON.parse(cli.out);
        expect(json.actors).toEqual(upload.data.actors);
        expect(json.ties).toBe(upload.data.waves[0].adjacency.reduce((s, v) => s + v, 0));
      } else {
        // the command line names the first problem of the upload's list
        expect(cli.err).toContain(upload.details.problems[0].message);
      }
    });
  }

  it('says so when a file has missing pairs, which the upload accepts and the command line does not', () => {
    const text = ',a,b\na,0,NA\nb,1,0\n';
    expect(parseNetworkFile('m.csv', text, 'matrix').ok).toBe(true);
    expect(run(['stats', file('missing.csv', text)]).err).toMatch(/missing \("NA"\); the command line computes statistics of complete networks only/);
    expect(run(['stats', file('missing-x.csv', ',a,b\na,0,x\nb,1,0\n'), '--missing', 'x']).err).toMatch(/missing \("x"\)/);
  });
});
