/**
 * Every CSV the product writes is safe to open in a spreadsheet: no text cell may start with
 * =, +, -, @, a tab or a carriage return (OWASP, "CSV Injection"), since a spreadsheet would run it as
 * a formula. The files are read back with Python's csv module (RFC 4180, Debian's /usr/bin/python3),
 * not with our own reader. Numbers the server writes (e.g. -2.2) stay numbers.
 */
import { spawnSync } from 'node:child_process';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csvCell, csvDocument } from '../../shared/csvSafe';
import type { BatchDetail } from '../../shared/batches';
import { UserEntity } from '../../server/auth/entities';
import { stopJobQueue } from '../../server/jobs';
import { REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

const FORMULA_START = /^[=+\-@\t\r]/;
const NUMBER = /^-?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Parses CSV text with Python's csv module (RFC 4180). */
function pythonCsv(text: string): string[][] {
  const py = spawnSync('/usr/bin/python3', ['-c', 'import csv,io,json,sys; print(json.dumps(list(csv.reader(io.StringIO(sys.stdin.read(), newline="")))))'], { input: text, encoding: 'utf8' });
  if (py.status !== 0) throw new Error(py.stderr);
  return JSON.parse(py.stdout) as string[][];
}

function unsafeCells(rows: string[][]): string[] {
  return rows.flat().filter((cell) => FORMULA_START.test(cell) && !NUMBER.test(cell));
}

describe('csvCell', () => {
  it.each(['=1+1', '+A1', '-1+1', '@SUM(A1)', '\tx', '\rx', "=cmd|' /C calc'!A0"])('neutralises %j with a leading apostrophe', (text) => {
    const [[cell]] = pythonCsv(csvDocument([[text]]));
    expect(cell).toBe(`'${text}`);
  });
  it('leaves ordinary text and numbers as they are, and quotes per RFC 4180', () => {
    expect(pythonCsv(csvDocument([['a, "b"', 'line\nbreak', -2.2, 1e-7, 'plain']]))).toEqual([['a, "b"', 'line\nbreak', '-2.2', '1e-7', 'plain']]);
    expect(csvCell(Number.NaN)).toBe('');
  });
});

describe('CSV exports', () => {
  let t: TestApp;
  let stats: string;
  let reviewer: string;
  let batchId: number;
  const B = () => `/api/studies/${t.seed.studyId}/batches/${batchId}`;

  beforeAll(async () => {
    t = await makeTestApp();
    [stats, reviewer] = await Promise.all([t.tokenFor(STATS), t.tokenFor(REVIEWER)]);
    const res = await request(t.app)
      .post(`/api/studies/${t.seed.studyId}/batches`)
      .set(bearer(stats))
      .send({ model: { rates: [2.5, 2.5], effects: [{ id: 'density', value: -2.2 }, { id: 'reciprocity', value: 1.6 }] }, chains: 60, seed: 5 });
    expect(res.status).toBe(201);
    batchId = res.body.batch.id as number;
    for (let i = 0; i < 600; i++) {
      const b = (await request(t.app).get(B()).set(bearer(stats))).body.batch as BatchDetail;
      if (b.state === 'done') break;
      await sleep(100);
    }
    // A hostile display name and hostile notes, each starting with a formula character.
    await t.dataSource.getRepository(UserEntity).update({ email: REVIEWER }, { name: '=HYPERLINK("http://evil.invalid","click")' });
    const notes = ["=cmd|' /C calc'!A0", '@SUM(1+1)*cmd|\' /C calc\'!A0', '+1+1', '-1+1'];
    const statistics = ['triad_census', 'indegree_distribution', 'outdegree_distribution', 'dyad_census'];
    for (let i = 0; i < notes.length; i++) {
      const r = await request(t.app).post(`${B()}/verdicts`).set(bearer(reviewer)).send({ statistic: statistics[i], period: 1, verdict: 'unsure', note: notes[i], version: 0 });
      expect(r.status, JSON.stringify(r.body)).toBe(201);
    }
  });
  afterAll(async () => {
    await stopJobQueue(t.dataSource);
    await t.close();
  });

  it('report.csv (statistics table) keeps hostile notes and names as text', async () => {
    const res = await request(t.app).get(`${B()}/report.csv?table=gof`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    const rows = pythonCsv(res.text);
    expect(unsafeCells(rows)).toEqual([]);
    const header = rows[0];
    const notes = rows.slice(1).map((r) => r[header.indexOf('verdict_note')]).filter(Boolean);
    expect(notes).toContain("'=cmd|' /C calc'!A0");
    expect(notes).toContain("'-1+1");
    expect(rows.slice(1).map((r) => r[header.indexOf('verdict_by')])).toContain(`'=HYPERLINK("http://evil.invalid","click")`);
  });

  it('report.csv (estimates table) has no live formula and keeps negative estimates numeric', async () => {
    const res = await request(t.app).get(`${B()}/report.csv?table=estimates`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    const rows = pythonCsv(res.text);
    expect(unsafeCells(rows)).toEqual([]);
    expect(rows.find((r) => r[2] === 'density')?.[4]).toBe('-2.2');
  });

  it('statistics.csv (chains of one statistic) has no live formula', async () => {
    for (const statistic of ['triad_census', 'indegree_distribution', 'geodesic_distribution']) {
      const res = await request(t.app).get(`${B()}/statistics.csv?statistic=${statistic}&period=1`).set(bearer(reviewer));
      expect(res.status, statistic).toBe(200);
      const rows = pythonCsv(res.text);
      expect(rows.length).toBe(61);
      expect(unsafeCells(rows)).toEqual([]);
    }
  });
});
