/**
 * /api/studies/:studyId/data: upload (lead, statistician), a dry-run preview of an upload with the
 * same parser (lead, statistician; stores nothing), read the summaries (members), one wave's ties,
 * the shared seeded layout of the waves, and downloads of the stored waves and actors as CSV in the
 * upload format (members). An upload is validated completely before anything is written, and then
 * written in one transaction that replaces the study's data.
 */
import { Router } from 'express';
import { dataUploadBodySchema, type DataPreviewResponse, type DataUploadResponse, type ParsedDataUploadBody } from '../../shared/data';
import { currentStudy } from '../auth/context';
import { dataLayout, downloadActors, downloadFixedPairs, downloadWave } from './exports';
import { parseUpload } from './parse';
import { dataReplaceInfo } from './replaceGuards';
import { parsedDataView, replaceStudyData, studyDataView, waveTies } from './store';
import { ApiError, idParam, notFound, validate } from '../errors';
import type { RouteDeps } from '../deps';

function problemCount(problems: unknown[], truncated: boolean): string {
  return truncated ? `More than ${problems.length} problems` : `${problems.length} problem${problems.length === 1 ? '' : 's'}`;
}

export function dataRouter(deps: RouteDeps): Router {
  const { dataSource, auth } = deps;
  const router = Router();

  router.get('/:studyId/data', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    res.json(await studyDataView(dataSource, currentStudy(req).study.id));
  });

  router.post(
    '/:studyId/data/preview',
    auth.requireUser,
    auth.requireStudyRole('editData'),
    validate(dataUploadBodySchema),
    async (req, res) => {
      const { study } = currentStudy(req);
      const parsed = parseUpload(req.body as ParsedDataUploadBody);
      const replace = await dataReplaceInfo(dataSource.manager, study.id);
      let body: DataPreviewResponse;
      if (parsed.ok) {
        body = { ok: true, preview: parsedDataView(parsed.data), replace };
      } else {
        const { problems, truncated } = parsed.details;
        body = { ok: false, message: `${problemCount(problems, truncated)} in the files; nothing can be stored until they are fixed.`, problems, truncated, replace };
      }
      res.json(body);
    },
  );

  router.post(
    '/:studyId/data',
    auth.requireUser,
    auth.requireStudyRole('editData'),
    validate(dataUploadBodySchema),
    async (req, res) => {
      const { study } = currentStudy(req);
      const upload = req.body as ParsedDataUploadBody;
      const parsed = parseUpload(upload);
      if (!parsed.ok) {
        const { problems, truncated } = parsed.details;
        throw new ApiError(400, 'data_invalid', `${problemCount(problems, truncated)} in the uploaded files; nothing was stored.`, parsed.details);
      }
      let replaced: boolean;
      try {
        ({ replaced } = await replaceStudyData(dataSource, study.id, parsed.data, undefined, { confirmReplace: upload.confirmReplace }));
      } catch (error) {
        if (error instanceof ApiError && error.code === 'data_in_use') {
          throw new ApiError(409, 'data_in_use', error.message, await dataReplaceInfo(dataSource.manager, study.id));
        }
        throw error;
      }
      const view = await studyDataView(dataSource, study.id);
      const body: DataUploadResponse = {
        ...view,
        replaced,
        message: `${replaced ? 'Replaced the study data with' : 'Stored'} ${parsed.data.waves.length} waves of ${parsed.data.actors.length} actors and ${parsed.data.covariates.length} covariate${parsed.data.covariates.length === 1 ? '' : 's'}.`,
      };
      res.status(replaced ? 200 : 201).json(body);
    },
  );

  router.get('/:studyId/data/layout', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const layout = await dataLayout(dataSource, currentStudy(req).study.id);
    if (!layout) throw notFound('This study has no data yet.');
    res.json(layout);
  });

  router.get('/:studyId/data/actors.csv', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const { study } = currentStudy(req);
    const csv = await downloadActors(dataSource, study.id);
    if (csv === null) throw notFound('This study has no data yet.');
    res.type('text/csv; charset=utf-8').attachment(`study-${study.id}-actors.csv`).send(csv);
  });

  router.get('/:studyId/data/fixed-pairs.csv', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const { study } = currentStudy(req);
    const csv = await downloadFixedPairs(dataSource, study.id);
    if (csv === null) throw notFound('This study has no fixed pairs.');
    res.type('text/csv; charset=utf-8').attachment(`study-${study.id}-fixed-pairs.csv`).send(csv);
  });

  router.get('/:studyId/data/waves/:index.csv', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const { study } = currentStudy(req);
    const index = idParam(req, 'index', 'Wave');
    const csv = await downloadWave(dataSource, study.id, index);
    if (csv === null) throw notFound(`Wave ${index} not found.`);
    res.type('text/csv; charset=utf-8').attachment(`study-${study.id}-wave-${index}.csv`).send(csv);
  });

  router.get('/:studyId/data/waves/:index', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const index = idParam(req, 'index', 'Wave');
    const result = await waveTies(dataSource, currentStudy(req).study.id, index);
    if (!result) throw notFound(`Wave ${index} not found.`);
    res.json(result);
  });

  return router;
}
