/**
 * The upload parser (server/data/parse.ts): every bad-input case gives its message with the file,
 * line and column; good files in both formats give the expected matrices and covariates; a matrix
 * written with formatMatrixCsv reads back unchanged. Expected values are worked out by hand from the
 * small files below (common practice).
 */
import { describe, expect, it } from 'vitest';
import { dataUploadBodySchema, type DataProblem, type DataUploadBody } from '../../shared/data';
import { readCsv, splitCsvLine } from '../../server/data/csv';
import { formatMatrixCsv } from '../../server/data/download';
import { TIE_MISSING, parseUpload, type ParsedStudyData } from '../../server/data/parse';

const parse = (body: DataUploadBody) => parseUpload(dataUploadBodySchema.parse(body));

function ok(body: DataUploadBody): ParsedStudyData {
  const result = parse(body);
  if (!result.ok) throw new Error(`expected a valid upload, got ${JSON.stringify(result.details.problems, null, 1)}`);
  return result.data;
}
function problems(body: DataUploadBody): DataProblem[] {
  const result = parse(body);
  if (result.ok) throw new Error('expected problems, the upload was accepted');
  return result.details.problems;
}
const edges = (...waves: string[]): DataUploadBody => ({
  format: 'edgelist',
  waves: waves.map((content, k) => ({ label: `w${k + 1}`, content })),
});
const matrices = (...waves: string[]): DataUploadBody => ({
  format: 'matrix',
  waves: waves.map((content, k) => ({ label: `w${k + 1}`, content })),
});
const rows = (adjacency: Uint8Array, n: number) =>
  Array.from({ length: n }, (_, i) => Array.from(adjacency.slice(i * n, i * n + n)).join(''));

const M1 = ',a,b,c\na,0,1,0\nb,1,0,1\nc,0,0,0\n';
const M2 = ',a,b,c\na,0,1,NA\nb,0,0,1\nc,1,0,0\n';

describe('csv reading', () => {
  it('splits quoted fields, semicolons and tabs, trims spaces and skips blank lines', () => {
    expect(splitCsvLine(' "Smith, J." , "say ""hi""",x', ',').fields).toEqual(['Smith, J.', 'say "hi"', 'x']);
    expect(splitCsvLine('a,b,', ',').fields).toEqual(['a', 'b', '']);
    expect(readCsv('\uFEFFa;b\r\n\r\nc;d\n').rows).toEqual([
      { line: 1, fields: ['a', 'b'] },
      { line: 3, fields: ['c', 'd'] },
    ]);
    expect(readCsv('a\tb\nc\td').rows[1].fields).toEqual(['c', 'd']);
    expect(readCsv('a,"b\nc,d').problems).toEqual([{ line: 1, column: 2, message: 'A quoted field is not closed with " on this line.' }]);
  });
});

describe('good uploads', () => {
  it('reads edge lists with a header, an actors file and covariates of every kind', () => {
    const data = ok({
      format: 'edgelist',
      waves: [
        { label: 'spring', content: 'sender,receiver\nAri,Bex\nBex,Ari\nCato,Ari,NA\n' },
        { label: 'summer', content: 'Ari,Bex\nDara,Cato\nBex,Cato,0\n' },
      ],
      actors: {
        content: 'label,years,watch,skipper,drills@1,drills@2\nAri,3,Heron,1,4,5\nBex,12,Kestrel,0,NA,2\nCato,NA,Heron,0,1,1\nDara,7.5,,1,0,3\n',
      },
    });
    expect(data.actors).toEqual(['Ari', 'Bex', 'Cato', 'Dara']);
    expect(rows(data.waves[0].adjacency, 4)).toEqual(['0100', '1000', `${TIE_MISSING}000`, '0000']);
    expect(rows(data.waves[1].adjacency, 4)).toEqual(['0100', '0000', '0000', '0010']);
    expect(data.covariates).toEqual([
      { name: 'years', kind: 'numeric', changing: false, categories: [], values: [[3, 12, null, 7.5]] },
      { name: 'watch', kind: 'categorical', changing: false, categories: ['Heron', 'Kestrel'], values: [['Heron', 'Kestrel', 'Heron', null]] },
      { name: 'skipper', kind: 'numeric', changing: false, categories: [], values: [[1, 0, 0, 1]] },
      { name: 'drills', kind: 'numeric', changing: true, categories: [], values: [[4, null, 1, 0], [5, 2, 1, 3]] },
    ]);
  });

  it('without an actors file takes the actors in order of first appearance', () => {
    const data = ok(edges('from,to\nc,a\na,b\n', 'b,d\n'));
    expect(data.actors).toEqual(['c', 'a', 'b', 'd']);
    expect(data.covariates).toEqual([]);
  });

  it('reads matrices and matches later waves by label when their order differs', () => {
    const data = ok(matrices(M1, ',c,a,b\nc,0,1,0\na,NA,0,1\nb,0,0,0\n'));
    expect(data.actors).toEqual(['a', 'b', 'c']);
    expect(rows(data.waves[0].adjacency, 3)).toEqual(['010', '101', '000']);
    // second wave: c->a, a->b, a->c missing; in the order a, b, c
    expect(rows(data.waves[1].adjacency, 3)).toEqual([`01${TIE_MISSING}`, '000', '100']);
  });

  it('a diagonal marked missing is stored as 0', () => {
    const data = ok(matrices(',a,b\na,NA,1\nb,0,0\n', ',a,b\na,0,0\nb,1,0\n'));
    expect(rows(data.waves[0].adjacency, 2)).toEqual(['01', '00']);
  });

  it('round trip: a matrix written by formatMatrixCsv reads back unchanged, quotes and missing cells included', () => {
    const actors = ['Ari', 'Bex, Jr.', '"Cato"', 'Dara'];
    const a = Uint8Array.from([0, 1, 2, 0, 1, 0, 0, 1, 0, 0, 0, 2, 1, 1, 0, 0]);
    const b = Uint8Array.from([0, 0, 1, 0, 1, 0, 1, 0, 0, 1, 0, 0, 0, 0, 1, 0]);
    const data = ok({
      format: 'matrix',
      missingMarker: '.',
      waves: [
        { label: 'one', content: formatMatrixCsv(actors, a, '.') },
        { label: 'two', content: formatMatrixCsv(actors, b, '.') },
      ],
    });
    expect(data.actors).toEqual(actors);
    expect(Array.from(data.waves[0].adjacency)).toEqual(Array.from(a));
    expect(Array.from(data.waves[1].adjacency)).toEqual(Array.from(b));
    expect(formatMatrixCsv(data.actors, data.waves[0].adjacency, '.')).toBe(formatMatrixCsv(actors, a, '.'));
  });
});

describe('bad uploads: each problem names file, line and column', () => {
  const cases: Array<{ name: string; body: DataUploadBody; expected: Omit<Partial<DataProblem>, 'message'> & { message: RegExp } }> = [
    {
      name: 'unknown actor (edge list against the actors file)',
      body: { ...edges('a,b\n', 'a,b\nb,zed\n'), actors: { content: 'label\na\nb\n' } },
      expected: { file: 'wave "w2"', line: 2, column: 2, message: /Unknown actor "zed"/ },
    },
    {
      name: 'unknown actor (matrix against wave 1)',
      body: matrices(M1, ',a,b,x\na,0,1,0\nb,1,0,1\nx,0,0,0\n'),
      expected: { file: 'wave "w2"', line: 1, column: 4, message: /Unknown actor "x"/ },
    },
    {
      name: 'self-tie in an edge list',
      body: edges('a,b\nb,b\n', 'a,b\n'),
      expected: { file: 'wave "w1"', line: 2, column: 2, message: /Self-tie/ },
    },
    {
      name: 'self-tie on a matrix diagonal',
      body: matrices(M1, ',a,b,c\na,0,1,0\nb,0,1,0\nc,0,0,0\n'),
      expected: { file: 'wave "w2"', line: 3, column: 3, message: /Self-tie.*"b"/ },
    },
    {
      name: 'value not 0/1 in a matrix',
      body: matrices(M1, ',a,b,c\na,0,1,0\nb,0,0,2\nc,0,0,0\n'),
      expected: { file: 'wave "w2"', line: 3, column: 4, message: /The value "2" is not 0, 1 or the missing marker "NA"/ },
    },
    {
      name: 'value not 0/1 in an edge list',
      body: edges('a,b,yes\n', 'a,b\n'),
      expected: { file: 'wave "w1"', line: 1, column: 3, message: /The value "yes"/ },
    },
    {
      name: 'non-square matrix (a short row)',
      body: matrices(M1, ',a,b,c\na,0,1,0\nb,0,0\nc,0,0,0\n'),
      expected: { file: 'wave "w2"', line: 3, message: /not square: this row has 2 values for 3 columns/ },
    },
    {
      name: 'non-square matrix (a missing row)',
      body: matrices(M1, ',a,b,c\na,0,1,0\nb,0,0,0\n'),
      expected: { file: 'wave "w2"', line: 1, message: /not square: the first row names 3 actors but 2 rows follow/ },
    },
    {
      name: 'row and column labels that differ',
      body: matrices(M1, ',a,b,c\na,0,1,0\nc,0,0,0\nb,0,0,0\n'),
      expected: { file: 'wave "w2"', line: 3, column: 1, message: /row label "c" differs from the column label "b"/ },
    },
    {
      name: 'duplicate label in a matrix',
      body: matrices(',a,b,a\na,0,1,0\nb,0,0,0\na,0,0,0\n', M1),
      expected: { file: 'wave "w1"', line: 1, column: 4, message: /Duplicate actor label "a".*column 2/ },
    },
    {
      name: 'duplicate label in the actors file',
      body: { ...edges('a,b\n', 'a,b\n'), actors: { fileName: 'crew.csv', content: 'label,age\na,1\nb,2\na,3\n' } },
      expected: { file: 'actors file (crew.csv)', line: 4, column: 1, message: /Duplicate actor label "a" \(first on line 2\)/ },
    },
    {
      name: 'duplicate tie',
      body: edges('a,b\nb,c\na,b\n', 'a,b\n'),
      expected: { file: 'wave "w1"', line: 3, column: 1, message: /Duplicate tie "a" → "b" \(first on line 1\)/ },
    },
    {
      name: 'wave sizes that differ',
      body: matrices(M1, ',a,b\na,0,1\nb,0,0\n'),
      expected: { file: 'wave "w2"', line: 1, message: /has 2 actors but wave "w1" has 3/ },
    },
    {
      name: 'a matrix that leaves out an actor of the actors file',
      body: { ...matrices(M1, M2), actors: { content: 'label\na\nb\nc\nd\n' } },
      expected: { file: 'wave "w1"', line: 1, message: /has 3 actors but the actors file has 4/ },
    },
    {
      name: 'fewer than two waves',
      body: edges('a,b\n'),
      expected: { file: '', message: /at least two waves; one was given/ },
    },
    {
      name: 'a file over the size limit',
      body: { format: 'edgelist', waves: [{ label: 'big', fileName: 'big.csv', content: 'a,b\n'.repeat(600_000) }, { label: 'w2', content: 'a,b\n' }] },
      expected: { file: 'wave "big" (big.csv)', message: /2\.3 MB; at most 2 MB/ },
    },
    {
      name: 'an empty file',
      body: edges('a,b\n', '\n  \n'),
      expected: { file: 'wave "w2"', message: /The file is empty/ },
    },
    {
      name: 'a file whose only line has an unclosed quote',
      body: matrices('"a,b\n', M1),
      expected: { file: 'wave "w1"', line: 1, column: 1, message: /quoted field is not closed/ },
    },
    {
      name: 'an edge-list line with one field',
      body: edges('a,b\nc\n', 'a,b\n'),
      expected: { file: 'wave "w1"', line: 2, message: /this line has 1 field\./ },
    },
    {
      name: 'an actors file without the label header',
      body: { ...edges('a,b\n', 'a,b\n'), actors: { content: 'name,age\na,1\n' } },
      expected: { file: 'actors file', line: 1, column: 1, message: /first column is "label"/ },
    },
    {
      name: 'a changing covariate with a gap in its waves',
      body: { ...edges('a,b\n', 'a,b\n', 'b,a\n'), actors: { content: 'label,x@1,x@3\na,1,2\nb,3,4\n' } },
      expected: { file: 'actors file', line: 1, column: 2, message: /"x@1" to "x@2".*found @1, @3/ },
    },
    {
      name: 'two waves with one label',
      body: { format: 'edgelist', waves: [{ label: 'same', content: 'a,b\n' }, { label: 'same', content: 'a,b\n' }] },
      expected: { message: /Two waves are labelled "same"/ },
    },
  ];

  it.each(cases.map((c) => [c.name, c] as const))('%s', (_name, c) => {
    const found = problems(c.body);
    const { message, ...place } = c.expected;
    const match = found.find((p) => message.test(p.message));
    expect(match, `problems were ${JSON.stringify(found)}`).toBeDefined();
    expect(match).toMatchObject(place);
  });

  it('collects several problems across files, at most 20, and says when there were more', () => {
    const many = edges(Array.from({ length: 30 }, (_, k) => `x${k},x${k}`).join('\n'), 'a,b\nq\n');
    const result = parse(many);
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.details.problems).toHaveLength(20);
    expect(result.details.truncated).toBe(true);
    const two = parse(edges('a,a\n', 'b,b\n'));
    expect(two.ok ? [] : two.details.problems.map((p) => p.file)).toEqual(['wave "w1"', 'wave "w2"']);
    expect(two.ok ? true : two.details.truncated).toBe(false);
  });
});
