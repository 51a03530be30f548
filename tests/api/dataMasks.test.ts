/**
 * Structural zeros and ones (the fixed-pairs file) and changing composition (present@ columns of the
 * actors file), from the upload to the engine:
 * - bad files get their message with file, line and column, and nothing is stored;
 * - the waves view lists the fixed pairs and who is present when, and leaves absent actors' pairs out
 *   of density (ties over observed pairs among present actors, Wasserman & Faust 1994 ch. 4);
 * - download -> upload gives identical rows, masks included;
 * - a batch of 200 chains with a dense model: a pair fixed at 0 is never a tie in any simulated
 *   chain, a pair fixed at 1 always is, and an actor absent at the start of a period gets no ties in
 *   it (the simulator's pair and actor masks, METHODS.md; the rule that a structural zero is never
 *   offered as a choice is common practice);
 * - a fit is estimated on the masked data and its period inputs carry the masks.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { int32FromBlob } from '../../server/batches/jobKind';
import { loadStudyData } from '../../server/data/store';
import { stopJobQueue } from '../../server/jobs';
import { fitPeriods, periodInputs, type StoredSpec } from '../../server/models/modelData';
import type { DataUploadBody, StudyDataResponse } from '../../shared/data';
import { LEAD, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let lead: string;

const ACTORS = ['Ansel', 'Brann', 'Cleo', 'Dov', 'Esme', 'Finn', 'Greta', 'Hale'];
// Hale joins at wave 2. Ansel -> Brann can never be a tie; Cleo -> Dov always is.
const UPLOAD: DataUploadBody = {
  format: 'edgelist',
  waves: [
    { label: 'w1', fileName: 'w1.csv', content: 'Cleo,Dov\nBrann,Cleo\nDov,Esme\nEsme,Finn\nFinn,Greta\nGreta,Ansel\nBrann,Ansel\n' },
    { label: 'w2', fileName: 'w2.csv', content: 'Cleo,Dov\nBrann,Cleo\nDov,Esme\nEsme,Finn\nFinn,Hale\nGreta,Ansel\nHale,Greta\nAnsel,Cleo\n' },
    { label: 'w3', fileName: 'w3.csv', content: 'Cleo,Dov\nDov,Esme\nEsme,Finn\nFinn,Hale\nHale,Greta\nAnsel,Cleo\nCleo,Ansel\nBrann,Dov\n' },
  ],
  actors: {
    fileName: 'crew.csv',
    content: `label,years,present@1,present@2,present@3\n${ACTORS.map((a, i) => `${a},${i + 2},${a === 'Hale' ? 0 : 1},1,1`).join('\n')}\n`,
  },
  fixedPairs: { fileName: 'fixed.csv', content: 'sender,receiver,value,waves\nAnsel,Brann,0,\nCleo,Dov,1,1-3\n' },
};

async function rows(id: number) {
  const q = (sql: string) => t.dataSource.query(sql, [id]);
  return {
    actors: await q('SELECT "index", label FROM actors WHERE "studyId" = ? ORDER BY "index"'),
    waves: await q('SELECT "index", label, hex(adjacency) AS adjacency, hex(fixed) AS fixed, hex(present) AS present, "sourceFormat" FROM waves WHERE "studyId" = ? ORDER BY "index"'),
    covariates: await q('SELECT name, kind, changing, "values", categories FROM covariates WHERE "studyId" = ? ORDER BY name'),
  };
}

async function newStudy(name: string): Promise<number> {
  return (await request(t.app).post('/api/studies').set(bearer(lead)).send({ name, description: '' }).expect(201)).body.study.id;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

beforeAll(async () => {
  t = await makeTestApp();
  lead = await t.tokenFor(LEAD);
});
afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
});

describe('bad fixed-pairs and presence files', () => {
  it.each<[string, Partial<DataUploadBody>, { file: string; line?: number; column?: number; message: RegExp }]>([
    ['a tie of an absent actor', { waves: [UPLOAD.waves[0], UPLOAD.waves[1], UPLOAD.waves[2]].map((w, k) => (k === 0 ? { ...w, content: w.content + 'Hale,Ansel\n' } : w)) },
      { file: 'wave "w1" (w1.csv)', line: 8, column: 1, message: /^"Hale" is not present at wave 1 \(present@1 is 0/ }],
    ['a presence value that is not 0 or 1', { actors: { fileName: 'crew.csv', content: UPLOAD.actors!.content.replace('Hale,9,0', 'Hale,9,maybe') } },
      { file: 'actors file (crew.csv)', line: 9, column: 3, message: /"present@1" of "Hale" is "maybe"/ }],
    ['presence columns for only some waves', { actors: { fileName: 'crew.csv', content: 'label,present@1,present@2\nAnsel,1,1\n' } },
      { file: 'actors file (crew.csv)', line: 1, column: 2, message: /must be "present@1" to "present@3", one per wave; found @1, @2/ }],
    ['a fixed value that is not 0 or 1', { fixedPairs: { fileName: 'fixed.csv', content: 'Ansel,Brann,2\n' } },
      { file: 'fixed-pairs file (fixed.csv)', line: 1, column: 3, message: /fixed value "2" is not 0/ }],
    ['a fixed pair that the waves contradict', { fixedPairs: { fileName: 'fixed.csv', content: 'Brann,Cleo,0,1\n' } },
      { file: 'fixed-pairs file (fixed.csv)', line: 1, column: 3, message: /"Brann" → "Cleo" is fixed at 0 \(never a tie\), but wave 1 has this tie/ }],
    ['waves that do not exist', { fixedPairs: { fileName: 'fixed.csv', content: 'Ansel,Brann,0,2-5\n' } },
      { file: 'fixed-pairs file (fixed.csv)', line: 1, column: 4, message: /Waves "2-5" do not exist: the upload has waves 1 to 3/ }],
    ['an unknown actor', { fixedPairs: { fileName: 'fixed.csv', content: 'Ansel,Zora,0\n' } },
      { file: 'fixed-pairs file (fixed.csv)', line: 1, column: 2, message: /Unknown actor "Zora"/ }],
    ['a pair fixed twice', { fixedPairs: { fileName: 'fixed.csv', content: 'Ansel,Brann,0,1 2\nAnsel,Brann,0,2-3\n' } },
      { file: 'fixed-pairs file (fixed.csv)', line: 2, column: 1, message: /fixed twice at wave 2 \(first on line 1\)/ }],
  ])('%s: named with its place, nothing stored', async (_what, change, expected) => {
    const id = await newStudy('Bad masks');
    const res = await request(t.app).post(`/api/studies/${id}/data`).set(bearer(lead)).send({ ...UPLOAD, ...change }).expect(400);
    const problems = res.body.error.details.problems as Array<{ file: string; line?: number; column?: number; message: string }>;
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ file: expected.file, line: expected.line, column: expected.column });
    expect(problems[0].message).toMatch(expected.message);
    expect((await rows(id)).waves).toEqual([]);
  });
});

describe('fixed pairs and composition', () => {
  let studyId: number;

  beforeAll(async () => {
    studyId = await newStudy('Masks');
    await request(t.app).post(`/api/studies/${studyId}/data`).set(bearer(lead)).send(UPLOAD).expect(201);
  });

  it('are shown in the data view, and absent actors are left out of density', async () => {
    const view = (await request(t.app).get(`/api/studies/${studyId}/data`).set(bearer(lead)).expect(200)).body as StudyDataResponse;
    expect(view.fixedPairs).toBe(2);
    expect(view.fixed).toEqual([
      { sender: 'Ansel', receiver: 'Brann', value: 0, waves: [1, 2, 3] },
      { sender: 'Cleo', receiver: 'Dov', value: 1, waves: [1, 2, 3] },
    ]);
    expect(view.presence![ACTORS.indexOf('Hale')]).toEqual([false, true, true]);
    expect(view.presence![0]).toEqual([true, true, true]);
    // wave 1: 7 ties among the 7 present actors: 7 / (7 * 6); no pair is unobserved
    expect(view.waves[0]).toMatchObject({ ties: 7, missing: 0, absent: 1 });
    expect(view.waves[0].density).toBeCloseTo(7 / 42, 15);
    expect(view.waves[1]).toMatchObject({ ties: 8, absent: 0 });
    expect(view.waves[1].density).toBeCloseTo(8 / 56, 15);
  });

  it('download -> upload gives identical rows, masks included', async () => {
    const get = async (path: string) =>
      (await request(t.app).get(`/api/studies/${studyId}/data/${path}`).set(bearer(lead)).buffer(true).parse((r, cb) => {
        let s = '';
        r.on('data', (c: Buffer) => (s += c.toString('utf8')));
        r.on('end', () => cb(null, s));
      }).expect(200)).body as string;
    const waves = [];
    for (let k = 1; k <= 3; k++) waves.push({ label: `w${k}`, content: await get(`waves/${k}.csv`) });
    const actors = await get('actors.csv');
    const fixed = await get('fixed-pairs.csv');
    expect(actors.split('\n')[0]).toBe('label,years,present@1,present@2,present@3');
    expect(fixed).toBe('sender,receiver,value,waves\nAnsel,Brann,0,1 2 3\nCleo,Dov,1,1 2 3\n');
    const copy = await newStudy('Masks copy');
    await request(t.app).post(`/api/studies/${copy}/data`).set(bearer(lead)).send({ format: 'edgelist', waves, actors: { content: actors }, fixedPairs: { content: fixed } }).expect(201);
    const [a, b] = [await rows(studyId), await rows(copy)];
    expect(b).toEqual(a);
    expect(a.waves[0].fixed).not.toBeNull();
    expect(a.waves[0].present).not.toBeNull();
  });

  it('a batch never simulates a fixed pair other than its value, nor ties of an actor absent in the period', async () => {
    const res = await request(t.app)
      .post(`/api/studies/${studyId}/batches`)
      .set(bearer(lead))
      .send({ model: { rates: [6, 6], effects: [{ id: 'density', value: 1.5 }] }, chains: 200, seed: 11, statistics: ['dyad_census'] })
      .expect(201);
    const id = res.body.batch.id as number;
    for (let i = 0; i < 600; i++) {
      const b = await request(t.app).get(`/api/studies/${studyId}/batches/${id}`).set(bearer(lead));
      if (b.body.batch.state === 'done') break;
      expect(['queued', 'running']).toContain(b.body.batch.state);
      await sleep(100);
    }
    const n = ACTORS.length;
    const at = (a: string, b: string) => ACTORS.indexOf(a) * n + ACTORS.indexOf(b);
    const counted = await t.dataSource.query('SELECT period, networks, counts FROM batch_tie_counts WHERE "batchId" = ? ORDER BY period', [id]);
    expect(counted).toHaveLength(2);
    for (const row of counted) {
      const counts = int32FromBlob(row.counts);
      expect(row.networks).toBe(200);
      expect(counts[at('Ansel', 'Brann')], `period ${row.period}: Ansel -> Brann`).toBe(0);
      expect(counts[at('Cleo', 'Dov')], `period ${row.period}: Cleo -> Dov`).toBe(200);
      // a free pair under density 1.5 and rate 6 is a tie in most chains: the masks are what keeps those at 0
      expect(counts[at('Brann', 'Ansel')]).toBeGreaterThan(100);
    }
    const first = int32FromBlob(counted[0].counts);
    const hale = ACTORS.indexOf('Hale');
    for (let j = 0; j < n; j++) {
      if (j === hale) continue;
      expect(first[hale * n + j], `period 1: Hale -> ${ACTORS[j]}`).toBe(0);
      expect(first[j * n + hale], `period 1: ${ACTORS[j]} -> Hale`).toBe(0);
    }
    // in period 2 Hale is present at both waves and acts
    const second = int32FromBlob(counted[1].counts);
    expect(ACTORS.some((_, j) => j !== hale && second[hale * n + j] > 0)).toBe(true);
  });

  it('fits get the masks: the period inputs carry them and an estimate runs to the end', async () => {
    const data = await loadStudyData(t.dataSource, studyId);
    const spec: StoredSpec = { rates: [{ period: 1, estimate: true }, { period: 2, estimate: true }], effects: [{ id: 'density', estimate: true }] };
    const inputs = periodInputs(fitPeriods(data, spec), spec);
    const n = ACTORS.length;
    const hale = ACTORS.indexOf('Hale');
    expect(inputs[0].free![0 * n + 1]).toBe(0);
    expect(inputs[0].active![hale]).toBe(0);
    expect(inputs[1].active).toBeUndefined();
    const model = await request(t.app).post(`/api/studies/${studyId}/models`).set(bearer(lead)).send({ name: 'masked', ...spec }).expect(201);
    const fit = await request(t.app).post(`/api/studies/${studyId}/models/${model.body.model.id}/fits`).set(bearer(lead)).send({ seed: 5 }).expect(201);
    let state = fit.body.fit.state as string;
    for (let i = 0; i < 1200 && (state === 'queued' || state === 'running'); i++) {
      await sleep(100);
      state = (await request(t.app).get(`/api/studies/${studyId}/models/${model.body.model.id}/fits/${fit.body.fit.id}`).set(bearer(lead))).body.fit.state;
    }
    expect(state).toBe('done');
  });
});
