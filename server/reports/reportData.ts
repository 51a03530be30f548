/**
 * Everything a fit report says, gathered from stored rows in one object (ReportJson, shared/review.ts):
 * the study, the batch and the model it simulated (with the fit's standard errors and convergence),
 * every statistic's envelopes, p-values, verdict and comments, the comparison with other batches, the
 * sign-offs, and the software versions and seeds needed to reproduce it. The PDF, the CSV and the JSON
 * export are all drawn from this one object.
 */
import type { RefitResults } from '../../shared/refits';
import { existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { DataSource } from 'typeorm';
import type { ReportAllPeriodsJson, ReportJson, ReportStatisticJson } from '../../shared/review';
import { parameterLabel } from '../../shared/models';
import type { LoadedBatch } from '../batches/service';
import { syncDb } from '../db/sync';
import { compareItems, fitInfo } from '../review/compare';
import type { GofCache } from '../review/gofData';
import { ALL_PERIODS } from '../batches/gof';
import { gofStoreFor } from '../batches/gofStore';
import { commentsOf } from '../review/comments';
import { changedSince, requireDone, verdictCounts, verdictsOf } from '../review/service';
import { signoffsOf } from '../review/signoffs';
import { lineupsOf } from '../lineups/service';

const ROOT = resolve(__dirname, '../..');

/** Packages whose installed versions a report names (what computes, stores and draws the numbers). */
export const REPORTED_PACKAGES = ['typeorm', 'better-sqlite3', 'express', 'graphology', 'graphology-metrics', 'simple-statistics', 'zod', 'pdfkit', 'react-native-svg', 'expo'];

function readJson(path: string): Record<string, unknown> | null {
  try {
    return existsSync(path) ? (JSON.parse(readFileSync(path, 'utf8')) as Record<string, unknown>) : null;
  } catch {
    return null;
  }
}

/** Wavefit's version, Node's and the installed versions of the reported packages (the range from package.json when a package is not installed). */
export function softwareVersions(): ReportJson['software'] {
  const root = readJson(join(ROOT, 'package.json')) ?? {};
  const deps = { ...((root.dependencies as Record<string, string>) ?? {}), ...((root.devDependencies as Record<string, string>) ?? {}) };
  const packages: Record<string, string> = {};
  for (const name of REPORTED_PACKAGES) {
    const installed = readJson(join(ROOT, 'node_modules', name, 'package.json'));
    const v = (installed?.version as string | undefined) ?? deps[name];
    if (v) packages[name] = v;
  }
  return { wavefit: String(root.version ?? 'unknown'), node: process.version, packages };
}

export function buildReport(
  dataSource: DataSource,
  gof: GofCache,
  batch: LoadedBatch,
  compareWith: number[],
  refitStudy: RefitResults | null = null,
): ReportJson {
  requireDone(batch);
  const db = syncDb(dataSource);
  const studyId = batch.row.studyId;
  const study = db.prepare(`SELECT "id", "name", "description" FROM "studies" WHERE "id" = ?`).get(studyId) as { id: number; name: string; description: string };
  const waves = (db.prepare(`SELECT "label" FROM "waves" WHERE "studyId" = ? ORDER BY "index"`).all(studyId) as { label: string }[]).map((w) => w.label);
  const verdicts = verdictsOf(db, batch.row.id);
  const comments = commentsOf(db, batch.row.id);
  const fit = batch.row.fitId !== null ? fitInfo(dataSource, studyId, batch.row.fitId) : null;
  const fitParams = new Map((fit?.results?.parameters ?? []).map((p) => [p.key, p]));

  const lineups = lineupsOf(dataSource, batch, 0);
  const statistics: ReportStatisticJson[] = gof.all(dataSource, batch).map((c) => ({
    statistic: c.statistic,
    label: c.label,
    period: c.period,
    components: c.components,
    observed: c.observed,
    mean: c.mean,
    sd: c.sd,
    bands: c.bands.map((b) => ({ coverage: b.coverage, lower: b.lower, upper: b.upper })),
    pValue: c.pValue,
    pValueSimulatedOnly: c.pValueSimulatedOnly,
    distance: c.distance,
    chains: c.chains,
    reading: c.reading,
    caution: c.caution,
    verdict: verdicts.get(`${c.statistic}@${c.period}`) ?? null,
    comments: comments.filter((m) => m.statistic === c.statistic && m.period === c.period),
    lineups: lineups
      .filter((l) => l.statistic === c.statistic && l.period === c.period)
      .map((l) => ({ id: l.id, panels: l.panels, seed: l.seed, createdBy: l.createdBy, result: l.result })),
  }));

  // All periods together: stored when the batch finished (the routes' gof.prepare computes it if missing).
  const together = batch.summary.periods.length > 1 && batch.summary.periods.length === batch.model.rates.length ? gofStoreFor(dataSource).stored(batch.row.id, ALL_PERIODS) : null;
  const allPeriods: ReportAllPeriodsJson[] | null = together
    ? together.map(({ gof: g, sd }) => ({
        statistic: g.statistic,
        label: g.label,
        components: g.components,
        observed: g.observed,
        mean: g.mean,
        sd,
        bands: g.bands.map((b) => ({ coverage: b.coverage, lower: b.lower, upper: b.upper })),
        pValue: g.test.pValue,
        pValueSimulatedOnly: g.test.pValueSimulatedOnly,
        distance: g.test.distance,
        chains: g.test.chains,
        reading: g.reading,
        caution: g.caution,
      }))
    : null;

  const signoffs = signoffsOf(db, batch.row.id);
  const others = compareWith.filter((id) => id !== batch.row.id);
  const comparison = others.length ? compareItems(dataSource, gof, studyId, [batch.row.id, ...others], []) : null;

  return {
    generatedAt: new Date().toISOString(),
    study: { id: study.id, name: study.name, description: study.description, actors: batch.row.actorCount, waves },
    batch: {
      id: batch.row.id,
      label: batch.row.label,
      seed: batch.summary.seed,
      chains: batch.summary.chains,
      periods: batch.summary.periods,
      source: batch.model.source,
      fitId: batch.row.fitId,
      createdBy: batch.summary.createdBy,
      finishedAt: batch.summary.finishedAt,
    },
    model: {
      name: fit?.modelName ?? null,
      rates: batch.model.rates,
      effects: batch.model.effects.map((e) => {
        const key = e.covariate ? `${e.id}:${e.covariate}` : e.id;
        const p = fitParams.get(key);
        return { key, label: e.label || parameterLabel(key), value: e.value, se: p?.se ?? null, convergenceT: p?.convergenceT ?? null };
      }),
      rateDetails: batch.model.rates.map((r, k) => {
        const p = fitParams.get(`rate:${k + 1}`);
        return { period: k + 1, value: r, se: p?.se ?? null };
      }),
      fitSeed: fit?.seed ?? null,
      converged: fit?.results && fit.results.maxAbsT !== null ? fit.results.converged : null,
      maxAbsT: fit?.results?.maxAbsT ?? null,
      tauMax: fit?.results?.tauMax ?? null,
    },
    statistics,
    allPeriods,
    counts: verdictCounts(db, batch),
    comparison,
    refitStudy,
    signoffs,
    changedSinceSignoff: changedSince(db, batch.row.id, signoffs[0]),
    software: softwareVersions(),
  };
}
