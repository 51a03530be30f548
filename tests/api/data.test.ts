/**
 * Study data through the API: upload, summaries, one wave's ties, replacement, and refusals that
 * leave the stored data exactly as it was (every stored row compared before and after).
 * Summary values are worked out by hand for the small files below (density = ties / observed pairs,
 * reciprocity index 2M/L, Wasserman & Faust 1994; Jaccard 1912).
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_CREW } from '../../server/demo/waves';
import { parseUpload } from '../../server/data/parse';
import { loadStudyData, replaceStudyData } from '../../server/data/store';
import { dataUploadBodySchema, type DataUploadBody } from '../../shared/data';
import { LEAD, REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let stats: string;
let studyId: number;

const GOOD: DataUploadBody = {
  format: 'edgelist',
  waves: [
    { label: 'spring', fileName: 'spring.csv', content: 'sender,receiver\nAri,Bex\nBex,Ari\nBex,Cato\nCato,Dara\nDara,Ari\n' },
    { label: 'summer', fileName: 'summer.csv', content: 'Ari,Bex\nBex,Ari\nAri,Cato\nCato,Dara\nDara,Cato\nBex,Dara,NA\n' },
  ],
  actors: { fileName: 'crew.csv', content: 'label,years,watch,drills@1,drills@2\nAri,3,Heron,4,5\nBex,12,Kestrel,NA,2\nCato,1,Heron,1,1\nDara,7,Puffin,0,3\n' },
};

async function snapshot() {
  const q = (sql: string) => t.dataSource.query(sql, [studyId]);
  return {
    actors: await q('SELECT "index", label FROM actors WHERE "studyId" = ? ORDER BY "index"'),
    waves: await q('SELECT "index", label, hex(adjacency) AS adjacency, "sourceFormat" FROM waves WHERE "studyId" = ? ORDER BY "index"'),
    covariates: await q('SELECT name, kind, changing, "values", categories FROM covariates WHERE "studyId" = ? ORDER BY name'),
    view: (await request(t.app).get(`/api/studies/${studyId}/data`).set(bearer(stats))).body,
  };
}

beforeAll(async () => {
  t = await makeTestApp();
  stats = await t.tokenFor(STATS);
  // A new study led by the lead; the statistician joins it by invitation and uploads as a member.
  const lead = await t.tokenFor(LEAD);
  const created = await request(t.app).post('/api/studies').set(bearer(lead)).send({ name: 'Winter drills', description: '' }).expect(201);
  studyId = created.body.study.id;
  const invite = await request(t.app).post(`/api/studies/${studyId}/invitations`).set(bearer(lead)).send({ email: STATS, role: 'statistician' }).expect(201);
  expect(invite.body.invitation.role).toBe('statistician');
  const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(t.mailer.messages().at(-1)!.text)![1];
  await request(t.app).post(`/api/invitations/${token}/accept`).send({ name: 'x', password: 'wavefit-demo-1' }).expect(200);
});
afterAll(async () => t.close());

describe('a study without data', () => {
  it('says so', async () => {
    const res = await request(t.app).get(`/api/studies/${studyId}/data`).set(bearer(stats));
    expect(res.body).toEqual({ hasData: false, format: null, uploadedAt: null, actors: [], covariates: [], waves: [], changes: [] });
    await request(t.app).get(`/api/studies/${studyId}/data/waves/1`).set(bearer(stats)).expect(404);
  });
});

describe('upload', () => {
  it('stores and summarises a good upload', async () => {
    const res = await request(t.app).post(`/api/studies/${studyId}/data`).set(bearer(stats)).send(GOOD);
    expect(res.status).toBe(201);
    expect(res.body.replaced).toBe(false);
    expect(res.body.message).toBe('Stored 2 waves of 4 actors and 3 covariates.');
    expect(res.body.actors).toEqual(['Ari', 'Bex', 'Cato', 'Dara']);
    // spring: 5 ties of 12 pairs, one mutual dyad (Ari-Bex)
    expect(res.body.waves[0]).toEqual({ index: 1, label: 'spring', actors: 4, ties: 5, density: 5 / 12, reciprocity: 2 / 5, missing: 0 });
    // summer: Bex->Dara missing, 5 ties of 11 observed pairs, mutual Ari-Bex and Cato-Dara
    expect(res.body.waves[1]).toEqual({ index: 2, label: 'summer', actors: 4, ties: 5, density: 5 / 11, reciprocity: 4 / 5, missing: 1 });
    // over the 11 pairs observed twice: stable Ari->Bex, Bex->Ari, Cato->Dara; created Ari->Cato, Dara->Cato;
    // dissolved Bex->Cato, Dara->Ari
    expect(res.body.changes).toEqual([{ from: 1, to: 2, created: 2, dissolved: 2, stable: 3, hamming: 4, jaccard: 3 / 7, caution: null }]);
    expect(res.body.covariates.map((c: { name: string; kind: string; changing: boolean }) => [c.name, c.kind, c.changing])).toEqual([
      ['drills', 'numeric', true],
      ['watch', 'categorical', false],
      ['years', 'numeric', false],
    ]);
    const watch = res.body.covariates.find((c: { name: string }) => c.name === 'watch');
    expect(watch.summaries[0].counts).toEqual({ Heron: 2, Kestrel: 1, Puffin: 1 });

    const list = await request(t.app).get('/api/studies').set(bearer(stats));
    expect(list.body.studies.find((s: { id: number }) => s.id === studyId)).toMatchObject({ waveCount: 2, actorCount: 4 });
  });

  it('gives one wave as a tie list, with its missing pairs', async () => {
    const res = await request(t.app).get(`/api/studies/${studyId}/data/waves/2`).set(bearer(stats));
    expect(res.status).toBe(200);
    expect(res.body).toEqual({
      index: 2,
      label: 'summer',
      actors: ['Ari', 'Bex', 'Cato', 'Dara'],
      ties: [[0, 1], [0, 2], [1, 0], [2, 3], [3, 2]],
      missing: [[1, 3]],
    });
    await request(t.app).get(`/api/studies/${studyId}/data/waves/3`).set(bearer(stats)).expect(404);
    await request(t.app).get(`/api/studies/${studyId}/data/waves/zero`).set(bearer(stats)).expect(404);
  });

  it('a bad upload lists its problems and leaves the stored data exactly as it was', async () => {
    const before = await snapshot();
    const bad: DataUploadBody = {
      format: 'edgelist',
      waves: [
        { label: 'spring', fileName: 'spring.csv', content: 'Ari,Bex\nAri,Ari\n' },
        { label: 'summer', fileName: 'summer.csv', content: 'Ari,Bex\nAri,Zed\nAri,Bex\n' },
        { label: 'autumn', fileName: 'autumn.csv', content: '' },
      ],
      actors: GOOD.actors,
    };
    const res = await request(t.app).post(`/api/studies/${studyId}/data`).set(bearer(stats)).send(bad);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('data_invalid');
    expect(res.body.error.message).toBe('4 problems in the uploaded files; nothing was stored.');
    const places = res.body.error.details.problems.map((p: { file: string; line?: number; column?: number }) => [p.file, p.line, p.column]);
    expect(places).toEqual(
      expect.arrayContaining([
        ['wave "spring" (spring.csv)', 2, 2],
        ['wave "summer" (summer.csv)', 2, 2],
        ['wave "summer" (summer.csv)', 3, 1],
        ['wave "autumn" (autumn.csv)', undefined, undefined],
      ]),
    );
    expect(res.body.error.details.truncated).toBe(false);
    expect(await snapshot()).toEqual(before);
  });

  it('malformed bodies are refused before parsing, and change nothing', async () => {
    const before = await snapshot();
    const wrongFormat = await request(t.app).post(`/api/studies/${studyId}/data`).set(bearer(stats)).send({ ...GOOD, format: 'xlsx' });
    expect(wrongFormat.status).toBe(400);
    expect(wrongFormat.body.error.details.fields.format).toEqual(['The format must be "edgelist" or "matrix".']);
    const notText = await request(t.app).post(`/api/studies/${studyId}/data`).set(bearer(stats)).send({ format: 'matrix', waves: [{ label: 'a', content: 5 }] });
    expect(notText.status).toBe(400);
    expect(notText.body.error.details.fields['waves.0.content']).toEqual(['The file content must be text.']);
    const broken = await request(t.app).post(`/api/studies/${studyId}/data`).set(bearer(stats)).set('Content-Type', 'application/json').send('{"format":"matrix","waves":[');
    expect(broken.status).toBe(400);
    expect(broken.body.error.code).toBe('malformed_json');
    expect(await snapshot()).toEqual(before);
  });

  it('accepts bodies of several MB on the upload route (2 MB files), refusing only oversized files', async () => {
    const before = await snapshot();
    const big = 'Ari,Bex\n'.repeat(280_000); // about 2.2 MB
    const res = await request(t.app)
      .post(`/api/studies/${studyId}/data`)
      .set(bearer(stats))
      .send({ format: 'edgelist', waves: [{ label: 'a', content: big }, { label: 'b', content: big }] });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('data_invalid');
    expect(res.body.error.details.problems.map((p: { message: string }) => p.message)).toEqual([
      'The file has 2.1 MB; at most 2 MB are allowed per file.',
      'The file has 2.1 MB; at most 2 MB are allowed per file.',
    ]);
    expect(await snapshot()).toEqual(before);
  });

  it('a new upload replaces the data and says so', async () => {
    const matrix: DataUploadBody = {
      format: 'matrix',
      waves: [
        { label: 'one', content: ',x,y,z\nx,0,1,0\ny,0,0,1\nz,1,0,0\n' },
        { label: 'two', content: ',x,y,z\nx,0,1,1\ny,0,0,1\nz,1,0,0\n' },
        { label: 'three', content: ',x,y,z\nx,0,0,1\ny,1,0,0\nz,0,1,0\n' },
      ],
    };
    const res = await request(t.app).post(`/api/studies/${studyId}/data`).set(bearer(stats)).send(matrix);
    expect(res.status).toBe(200);
    expect(res.body.replaced).toBe(true);
    expect(res.body.message).toBe('Replaced the study data with 3 waves of 3 actors and 0 covariates.');
    expect(res.body.actors).toEqual(['x', 'y', 'z']);
    expect(res.body.covariates).toEqual([]);
    // two -> three: x->z stays; x->y, y->z, z->x dissolve; y->x, z->y are created: Jaccard 1/6
    expect(res.body.changes[1]).toMatchObject({ stable: 1, created: 2, dissolved: 3, hamming: 5 });
    expect(res.body.changes[1].jaccard).toBeCloseTo(1 / 6, 15);
    expect(res.body.changes[1].caution).toMatch(/Jaccard index 0\.17/);
    const rows = await t.counts('actors', 'waves', 'covariates');
    const demoRows = { actors: DEMO_CREW.length, waves: 3, covariates: 4 };
    expect(rows).toEqual({ actors: 3 + demoRows.actors, waves: 3 + demoRows.waves, covariates: demoRows.covariates });
  });

  it('a refusing replace guard (for later models) keeps the old data: 409 data_in_use', async () => {
    const before = await snapshot();
    const parsed = parseUpload(dataUploadBodySchema.parse(GOOD));
    if (!parsed.ok) throw new Error('GOOD should parse');
    const guard = async () => 'This study has models; delete them before replacing its data.';
    await expect(replaceStudyData(t.dataSource, studyId, parsed.data, [guard])).rejects.toMatchObject({
      status: 409,
      code: 'data_in_use',
    });
    expect(await snapshot()).toEqual(before);
  });

  it('a reviewer cannot upload', async () => {
    const lead = await t.tokenFor(LEAD);
    const reviewer = await t.tokenFor(REVIEWER);
    const demo = t.seed.studyId;
    const res = await request(t.app).post(`/api/studies/${demo}/data`).set(bearer(reviewer)).send(GOOD);
    expect(res.status).toBe(403);
    expect(res.body.error.message).toContain('lead or statistician');
    await request(t.app).get(`/api/studies/${demo}/data`).set(bearer(lead)).expect(200);
  });
});

describe('loadStudyData (for the estimator and batches)', () => {
  it('returns the demo study in the engine shapes', async () => {
    const data = await loadStudyData(t.dataSource, t.seed.studyId);
    const n = DEMO_CREW.length;
    expect(data.actors).toEqual([...DEMO_CREW]);
    expect(data.waveLabels).toEqual(['spring', 'midsummer', 'early autumn']);
    expect(data.waves).toHaveLength(3);
    for (const w of data.waves) {
      expect(w).toBeInstanceOf(Uint8Array);
      expect(w.length).toBe(n * n);
      for (let i = 0; i < n; i++) expect(w[i * n + i]).toBe(0);
    }
    expect(Object.keys(data.covariates).sort()).toEqual(['certified_skipper', 'drills', 'watch', 'years_of_service']);
    const watch = data.covariates.watch;
    expect(watch.categories).toEqual(['Heron', 'Kestrel', 'Puffin']);
    expect(watch.values[0]).toBeInstanceOf(Int32Array);
    expect(Array.from(watch.values[0]).slice(0, 4)).toEqual([0, 1, 2, 0]);
    expect(data.covariates.drills.changing).toBe(true);
    expect(data.covariates.drills.values).toHaveLength(3);
    expect(data.covariates.years_of_service.values[0]).toBeInstanceOf(Float64Array);
    await expect(loadStudyData(t.dataSource, 999)).rejects.toThrow(/no uploaded waves/);
  });

  it('the demo waves keep a Jaccard index above 0.3 between consecutive waves (assignment)', async () => {
    const res = await request(t.app).get(`/api/studies/${t.seed.studyId}/data`).set(bearer(await t.tokenFor(REVIEWER)));
    expect(res.body.changes).toHaveLength(2);
    for (const c of res.body.changes) {
      expect(c.jaccard).toBeGreaterThan(0.3);
      expect(c.caution).toBeNull();
    }
  });
});
