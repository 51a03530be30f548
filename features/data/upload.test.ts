/**
 * The upload screen's pure logic (features/data/upload.ts): roles guessed from names and first lines,
 * the wave format, a file picked again under the same name replacing the old one, role clashes, and
 * every server problem placed beside the file the server names (the names come from the same
 * functions in shared/data.ts that server/data/parse.ts uses).
 */
import { describe, expect, it } from 'vitest';
import { actorsFileTitle, fixedPairsFileTitle, waveFileTitle } from '../../shared/data';
import { addFiles, fieldsOf, guessFormat, guessRole, localProblems, placeProblems, uploadBody, waveEntries } from './upload';

const f = (name: string, content = 'a,b\n') => ({ name, content, bytes: content.length, tooLarge: false });
let n = 0;
const id = () => `e${++n}`;

describe('guessing', () => {
  it('takes the wave number from the name, the actors file from its name or label header, fixed pairs from the name', () => {
    expect(guessRole('wave2.csv', 'a,b', [])).toEqual({ role: 'wave', wave: 2 });
    expect(guessRole('spring_2026_w3.csv', 'a,b', [])).toEqual({ role: 'wave', wave: 3 });
    expect(guessRole('wave2.csv', 'a,b', [2])).toEqual({ role: 'wave', wave: 1 });
    expect(guessRole('people.csv', 'a,b', [])).toEqual({ role: 'actors', wave: 0 });
    expect(guessRole('x.csv', 'label,years\n', [])).toEqual({ role: 'actors', wave: 0 });
    expect(guessRole('fixed.csv', 'a,b,0', [])).toEqual({ role: 'fixed', wave: 0 });
  });

  it('tells a matrix (empty corner or many fields) from an edge list', () => {
    expect(guessFormat(',A,B\nA,0,1\nB,0,0\n')).toBe('matrix');
    expect(guessFormat('x,A,B,C\n')).toBe('matrix');
    expect(guessFormat('sender,receiver\nA,B\n')).toBe('edgelist');
    expect(guessFormat('A;B;1\n')).toBe('edgelist');
  });
});

describe('files and roles', () => {
  it('a file picked again under the same name replaces its content and keeps its role', () => {
    let entries = addFiles([], [f('wave1.csv'), f('wave2.csv', 'old\n'), f('actors.csv', 'label\n')], id);
    entries = entries.map((e) => (e.name === 'wave2.csv' ? { ...e, label: 'summer' } : e));
    entries = addFiles(entries, [f('wave2.csv', 'new\n')], id);
    expect(entries).toHaveLength(3);
    const w2 = entries.find((e) => e.name === 'wave2.csv')!;
    expect(w2).toMatchObject({ content: 'new\n', role: 'wave', wave: 2, label: 'summer' });
  });

  it('names clashing roles before the server is asked', () => {
    const entries = addFiles([], [f('wave1.csv'), f('wave1b.csv'), f('actors.csv', 'label\n'), f('crew.csv', 'label\n')], id).map((e) =>
      e.name === 'wave1b.csv' ? { ...e, wave: 1 } : e,
    );
    const messages = localProblems(entries).map((p) => p.message);
    expect(messages).toContain('Two files are wave 1 (wave1.csv and wave1b.csv); give each wave its own number.');
    expect(messages).toContain('Only one actors file can be used; actors.csv and crew.csv are both marked as actors files.');
  });

  it('builds the body with waves in wave order and places the server problems beside their files', () => {
    const entries = addFiles([], [f('wave3.csv'), f('wave1.csv'), f('wave2.csv'), f('actors.csv', 'label\n'), f('fixed.csv')], id);
    expect(waveEntries(entries).map((e) => e.name)).toEqual(['wave1.csv', 'wave2.csv', 'wave3.csv']);
    const body = uploadBody(entries, 'edgelist', ' NA ');
    expect(body.waves.map((w) => w.fileName)).toEqual(['wave1.csv', 'wave2.csv', 'wave3.csv']);
    expect(body).toMatchObject({ actors: { fileName: 'actors.csv' }, fixedPairs: { fileName: 'fixed.csv' }, missingMarker: 'NA' });
    const problems = [
      { file: waveFileTitle('wave2', 1, 'wave2.csv'), line: 3, column: 2, message: 'a' },
      { file: actorsFileTitle('actors.csv'), message: 'b' },
      { file: fixedPairsFileTitle('fixed.csv'), line: 1, message: 'c' },
      { file: '', message: 'd' },
    ];
    const placed = placeProblems(entries, problems, fixedPairsFileTitle);
    const byName = (name: string) => placed.byEntry.get(entries.find((e) => e.name === name)!.id)!.map((p) => p.message);
    expect(byName('wave2.csv')).toEqual(['a']);
    expect(byName('actors.csv')).toEqual(['b']);
    expect(byName('fixed.csv')).toEqual(['c']);
    expect(placed.general.map((p) => p.message)).toEqual(['d']);
  });

  it('splits a line into fields as the server does, quotes included', () => {
    expect(fieldsOf('a,"b,c",d', ',')).toEqual(['a', '"b,c"', 'd']);
    expect(fieldsOf('a\tb', '\t')).toEqual(['a', 'b']);
  });
});
