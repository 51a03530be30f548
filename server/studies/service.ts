/** Studies as the API shows them (shared/api.ts): each with its member, wave and actor counts. */
import type { DataSource } from 'typeorm';
import type { StudyRole, StudySummary } from '../../shared/api';
import type { Study } from './entities';

/** Rows of `table` per study, for the given study ids (0 where there are none). */
export async function countPerStudy(dataSource: DataSource, table: string, studyIds: number[]): Promise<Map<number, number>> {
  const counts = new Map<number, number>(studyIds.map((id) => [id, 0]));
  if (studyIds.length === 0) return counts;
  const rows: Array<{ studyId: number; n: number }> = await dataSource.query(
    `SELECT "studyId", COUNT(*) AS n FROM "${table}" WHERE "studyId" IN (${studyIds.map(() => '?').join(',')}) GROUP BY "studyId"`,
    studyIds,
  );
  for (const row of rows) counts.set(row.studyId, Number(row.n));
  return counts;
}

interface StudyCounts {
  memberCount: number;
  waveCount: number;
  actorCount: number;
}

/** Members, waves and actors per study, for the given study ids. */
export async function studyCounts(dataSource: DataSource, studyIds: number[]): Promise<Map<number, StudyCounts>> {
  const [members, waves, actors] = await Promise.all(
    ['memberships', 'waves', 'actors'].map((table) => countPerStudy(dataSource, table, studyIds)),
  );
  return new Map(
    studyIds.map((id) => [id, { memberCount: members.get(id)!, waveCount: waves.get(id)!, actorCount: actors.get(id)! }]),
  );
}

export async function studySummaries(
  dataSource: DataSource,
  studies: Array<{ study: Study; myRole: StudyRole | null }>,
): Promise<StudySummary[]> {
  const counts = await studyCounts(dataSource, studies.map((s) => s.study.id));
  return studies.map(({ study, myRole }) => ({
    id: study.id,
    name: study.name,
    description: study.description,
    myRole,
    ...counts.get(study.id)!,
    createdAt: study.createdAt.toISOString(),
    updatedAt: study.updatedAt.toISOString(),
  }));
}
