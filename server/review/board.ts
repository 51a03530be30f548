/** The review board of a batch: its cards with their verdicts, the open requests and the sign-offs. */
import type { DataSource } from 'typeorm';
import { countVerdicts, type BoardCard, type BoardResponse } from '../../shared/review';
import type { LoadedBatch } from '../batches/service';
import { syncDb } from '../db/sync';
import { requestsOf } from './requests';
import { cardKey, cardsOf, verdictsOf } from './service';
import { signoffsOf } from './signoffs';

export function boardOf(dataSource: DataSource, batch: LoadedBatch): BoardResponse {
  const db = syncDb(dataSource);
  const verdicts = verdictsOf(db, batch.row.id);
  const commentCounts = new Map(
    (
      db
        .prepare(`SELECT "statistic", "period", COUNT(*) AS n FROM "review_comments" WHERE "batchId" = ? GROUP BY "statistic", "period"`)
        .all(batch.row.id) as { statistic: string; period: number; n: number }[]
    ).map((r) => [cardKey(r.statistic, r.period), Number(r.n)]),
  );
  const cards: BoardCard[] = cardsOf(batch).map((c) => ({
    statistic: c.statistic,
    label: c.label,
    period: c.period,
    verdict: verdicts.get(cardKey(c.statistic, c.period)) ?? null,
    comments: commentCounts.get(cardKey(c.statistic, c.period)) ?? 0,
  }));
  return {
    studyId: batch.row.studyId,
    batchId: batch.row.id,
    batchLabel: batch.row.label,
    periods: batch.summary.periods,
    cards,
    counts: countVerdicts(cards.map((c) => c.verdict?.verdict ?? null)),
    requests: requestsOf(db, batch.row.id),
    signoff: signoffsOf(db, batch.row.id)[0] ?? null,
  };
}
