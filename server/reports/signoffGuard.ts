/**
 * The sign-off guard: what a lead must acknowledge before signing off a batch's report (a fit that
 * did not converge; fewer chains than FEW_CHAINS), and the check of a sign-off request against it.
 * A report without concerns signs off as before; one with concerns needs `acknowledgement.reason`
 * (400 acknowledgement_required otherwise, nothing stored).
 */
import type { DataSource } from 'typeorm';
import { FEW_CHAINS } from '../../shared/batches';
import { signoffConcerns, type SignoffAcknowledgement, type SignoffConcern } from '../../shared/review';
import type { LoadedBatch } from '../batches/service';
import { badRequest } from '../errors';
import { fitInfo } from '../review/compare';

export function concernsOf(dataSource: DataSource, batch: LoadedBatch): SignoffConcern[] {
  const fit = batch.row.fitId !== null ? fitInfo(dataSource, batch.row.studyId, batch.row.fitId) : null;
  const results = fit?.results ?? null;
  return signoffConcerns({
    converged: results && results.maxAbsT !== null ? results.converged : null,
    maxAbsT: results?.maxAbsT ?? null,
    tauMax: results?.tauMax ?? null,
    chains: batch.summary.chains,
    fewChains: FEW_CHAINS,
  });
}

/** The acknowledgement to store with a sign-off, or a 400 when the report has concerns and no reason was given. */
export function acknowledgementFor(concerns: SignoffConcern[], body: { acknowledgement?: { reason: string } }): SignoffAcknowledgement | null {
  if (concerns.length === 0) return null;
  const reason = body.acknowledgement?.reason?.trim() ?? '';
  if (!reason) {
    throw badRequest(`Signing off this report needs an acknowledgement with a reason: ${concerns.map((c) => c.message).join(' ')}`, { concerns }, 'acknowledgement_required');
  }
  return { concerns, reason };
}
