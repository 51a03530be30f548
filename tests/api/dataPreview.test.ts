/**
 * The upload's dry run, confirmed replacement and downloads through the API:
 * - the preview answers with exactly what the upload would store (same parser, same summaries) and
 *   stores nothing, also for a bad upload (problems with file, line and column);
 * - replacing data that a model was built on needs confirmReplace; the refusal names what becomes
 *   stale and changes nothing;
 * - download -> upload gives identical rows (edge lists and matrices, covariates constant and changing,
 *   missing ties and values, labels that start with = or -, negative numbers), and downloaded cells
 *   that a spreadsheet would run as formulas are neutralised (OWASP, CSV Injection: a leading
 *   apostrophe before = + - @ tab CR).
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { neutraliseFormula as neutraliseCell } from '../../shared/csvSafe';
import type { DataUploadBody } from '../../shared/data';
import { LEAD, REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let lead: string;
let studyId: number;

const GOOD: DataUploadBody = {
  format: 'edgelist',
  waves: [
    { label: 'spring', fileName: 'spring.csv', content: 'sender,receiver\n=Ari,Bex\nBex,=Ari\nBex,Cato\nCato,-Dara\n-Dara,=Ari\n' },
    { label: 'summer', fileName: 'summer.csv', content: '=Ari,Bex\nBex,=Ari\n=Ari,Cato\nCato,-Dara\n-Dara,Cato\nBex,-Dara,NA\n' },
    { label: 'autumn', fileName: 'autumn.csv', content: '=Ari,Bex\nBex,Cato\n=Ari,Cato\nCato,-Dara\n-Dara,Cato\nBex,-Dara\n' },
  ],
  actors: {
    fileName: 'crew.csv',
    content: 'label,years,watch,drills@1,drills@2\n=Ari,-3.5,Heron,4,5\nBex,12,@Kestrel,NA,2\nCato,1,Heron,1,1\n-Dara,7,NA,0,3\nEli,2,Puffin,1,1\n',
  },
};

async function rows(id: number) {
  const q = (sql: string) => t.dataSource.query(sql, [id]);
  return {
    actors: await q('SELECT "index", label FROM actors WHERE "studyId" = ? ORDER BY "index"'),
    waves: await q('SELECT "index", label, hex(adjacency) AS adjacency, "sourceFormat" FROM waves WHERE "studyId" = ? ORDER BY "index"'),
    covariates: await q('SELECT name, kind, changing, "values", categories FROM covariates WHERE "studyId" = ? ORDER BY name'),
  };
}

async function newStudy(name: string): Promise<number> {
  const res = await request(t.app).post('/api/studies').set(bearer(lead)).send({ name, description: '' }).expect(201);
  return res.body.study.id;
}

beforeAll(async () => {
  t = await makeTestApp();
  lead = await t.tokenFor(LEAD);
  studyId = await newStudy('Preview and downloads');
});
afterAll(async () => t.close());

describe('preview', () => {
  it('shows what the upload stores, and stores nothing', async () => {
    const before = await rows(studyId);
    const preview = await request(t.app).post(`/api/studies/${studyId}/data/preview`).set(bearer(lead)).send(GOOD).expect(200);
    expect(preview.body.ok).toBe(true);
    expect(preview.body.replace).toMatchObject({ hasData: false, needsConfirmation: false, stale: null });
    expect(await rows(studyId)).toEqual(before);
    const stored = await request(t.app).post(`/api/studies/${studyId}/data`).set(bearer(lead)).send(GOOD).expect(201);
    const { hasData, uploadedAt, replaced, message, ...view } = stored.body;
    expect(preview.body.preview).toEqual(view);
    expect(preview.body.preview.actors).toEqual(['=Ari', 'Bex', 'Cato', '-Dara', 'Eli']);
  });

  it('lists the problems of a bad upload with file, line and column, and stores nothing', async () => {
    const before = await rows(studyId);
    const bad = { ...GOOD, waves: [GOOD.waves[0], { label: 'summer', fileName: 'summer.csv', content: '=Ari,Bex\n=Ari,Zed\n' }] };
    const res = await request(t.app).post(`/api/studies/${studyId}/data/preview`).set(bearer(lead)).send(bad).expect(200);
    expect(res.body.ok).toBe(false);
    expect(res.body.problems).toEqual([{ file: 'wave "summer" (summer.csv)', line: 2, column: 2, message: 'Unknown actor "Zed": not in the actors file.' }]);
    expect(res.body.message).toBe('1 problem in the files; nothing can be stored until they are fixed.');
    // the upload itself refuses the same files with the same problem
    const up = await request(t.app).post(`/api/studies/${studyId}/data`).set(bearer(lead)).send(bad).expect(400);
    expect(up.body.error.details.problems).toEqual(res.body.problems);
    expect(await rows(studyId)).toEqual(before);
  });

  it('is for those who may upload: a reviewer is refused', async () => {
    const reviewer = await t.tokenFor(REVIEWER);
    const res = await request(t.app).post(`/api/studies/${t.seed.studyId}/data/preview`).set(bearer(reviewer)).send(GOOD);
    expect(res.status).toBe(403);
  });
});

describe('replacing data that a model was built on', () => {
  it('needs confirmation, says what becomes stale, and then replaces', async () => {
    const id = await newStudy('Replace with a model');
    await request(t.app).post(`/api/studies/${id}/data`).set(bearer(lead)).send(GOOD).expect(201);
    await request(t.app)
      .post(`/api/studies/${id}/models`)
      .set(bearer(lead))
      .send({ name: 'base', rates: [{ period: 1, estimate: true }], effects: [{ id: 'density', estimate: true }] })
      .expect(201);
    const before = await rows(id);
    const preview = await request(t.app).post(`/api/studies/${id}/data/preview`).set(bearer(lead)).send(GOOD).expect(200);
    expect(preview.body.replace).toMatchObject({ hasData: true, models: 1, fits: 0, batches: 0, running: 0, needsConfirmation: true });
    expect(preview.body.replace.stale).toMatch(/^1 model was built on the data stored now\./);

    const refused = await request(t.app).post(`/api/studies/${id}/data`).set(bearer(lead)).send(GOOD).expect(409);
    expect(refused.body.error.code).toBe('data_in_use');
    expect(refused.body.error.message).toMatch(/1 model was built on .* Confirm the replacement/);
    expect(refused.body.error.details.models).toBe(1);
    expect(await rows(id)).toEqual(before);

    const other = { ...GOOD, waves: GOOD.waves.slice(0, 2) };
    const done = await request(t.app).post(`/api/studies/${id}/data`).set(bearer(lead)).send({ ...other, confirmReplace: true }).expect(200);
    expect(done.body.replaced).toBe(true);
    expect((await rows(id)).waves).toHaveLength(2);
  });
});

describe('downloads', () => {
  async function download(id: number, path: string, token = lead): Promise<string> {
    const res = await request(t.app).get(`/api/studies/${id}/data/${path}`).set(bearer(token)).buffer(true).parse((r, cb) => {
      let s = '';
      r.on('data', (c: Buffer) => (s += c.toString('utf8')));
      r.on('end', () => cb(null, s));
    });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    return res.body as string;
  }

  async function roundTrip(original: DataUploadBody) {
    const first = await newStudy('Round trip A');
    await request(t.app).post(`/api/studies/${first}/data`).set(bearer(lead)).send(original).expect(201);
    const waves = [];
    for (let k = 1; k <= original.waves.length; k++) waves.push({ label: original.waves[k - 1].label, content: await download(first, `waves/${k}.csv`) });
    const actors = await download(first, 'actors.csv');
    const second = await newStudy('Round trip B');
    await request(t.app).post(`/api/studies/${second}/data`).set(bearer(lead)).send({ format: original.format, waves, actors: { content: actors } }).expect(201);
    return { a: await rows(first), b: await rows(second), waves, actors };
  }

  it('edge lists: upload -> download -> upload gives identical rows', async () => {
    const { a, b, waves, actors } = await roundTrip(GOOD);
    expect(b).toEqual(a);
    expect(a.waves).toHaveLength(3);
    expect(a.covariates.map((c: { name: string }) => c.name)).toEqual(['drills', 'watch', 'years']);
    // the missing pair is written with the missing marker; formula-like labels get an apostrophe
    expect(waves[1].content.split('\n')).toContain(`Bex,'-Dara,NA`);
    expect(waves[0].content.split('\n')[0]).toBe('sender,receiver,value');
    expect(actors.split('\n')[0]).toBe('label,watch,years,drills@1,drills@2');
    expect(actors.split('\n')).toContain(`'=Ari,Heron,-3.5,4,5`);
    expect(actors.split('\n')).toContain(`Bex,'@Kestrel,12,NA,2`);
  });

  it('matrices: upload -> download -> upload gives identical rows, isolates included', async () => {
    const matrix: DataUploadBody = {
      format: 'matrix',
      waves: [
        { label: 'one', content: ',x,+y,z\nx,0,1,NA\n+y,0,0,1\nz,1,0,0\n' },
        { label: 'two', content: ',x,+y,z\nx,0,1,1\n+y,0,0,0\nz,0,0,0\n' },
      ],
    };
    const { a, b, waves } = await roundTrip(matrix);
    expect(b).toEqual(a);
    expect(waves[0].content).toBe(`,x,'+y,z\nx,0,1,NA\n'+y,0,0,1\nz,1,0,0\n`);
  });

  it('neutralises every risky first character but leaves numbers alone (OWASP CSV Injection)', () => {
    for (const c of ['=', '+', '-', '@', '\t', '\r']) expect(neutraliseCell(`${c}SUM(A1)`)).toBe(`'${c}SUM(A1)`);
    expect(neutraliseCell('-3.5')).toBe('-3.5');
    expect(neutraliseCell('+7')).toBe('+7');
    expect(neutraliseCell('Ari')).toBe('Ari');
  });

  it('a study without data has nothing to download; reviewers may download', async () => {
    const empty = await newStudy('Nothing yet');
    await request(t.app).get(`/api/studies/${empty}/data/actors.csv`).set(bearer(lead)).expect(404);
    await request(t.app).get(`/api/studies/${empty}/data/waves/1.csv`).set(bearer(lead)).expect(404);
    const reviewer = await t.tokenFor(REVIEWER);
    const csv = await download(t.seed.studyId, 'waves/1.csv', reviewer);
    expect(csv.split('\n')[0]).toBe('sender,receiver,value');
    const stats = await t.tokenFor(STATS);
    const layout = await request(t.app).get(`/api/studies/${t.seed.studyId}/data/layout`).set(bearer(stats)).expect(200);
    expect(layout.body.positions).toHaveLength(layout.body.actors.length);
    for (const [x, y] of layout.body.positions) expect(x >= 0 && x <= 1 && y >= 0 && y <= 1).toBe(true);
  });
});
