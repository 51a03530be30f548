/**
 * /api/studies/:studyId/data: upload (lead, statistician), read the summaries (members), and one
 * wave's ties (members). An upload is validated completely before anything is written, and then
 * written in one transaction that replaces the study's data.
 */
import { Router } from 'express';
import { dataUploadBodySchema, type DataUploadResponse, type ParsedDataUploadBody } from '../../shared/data';
import { currentStudy } from '../auth/context';
import { parseUpload } from './parse';
import { replaceStudyData, studyDataView, waveTies } from './store';
import { ApiError, idParam, notFound, validate } from '../errors';
import type { RouteDeps } from '../deps';

export function dataRouter(deps: RouteDeps): Router {
  const { dataSource, auth } = deps;
  const router = Router();

  router.get('/:studyId/data', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    res.json(await studyDataView(dataSource, currentStudy(req).study.id));
  });

  router.post(
    '/:studyId/data',
    auth.requireUser,
    auth.requireStudyRole('editData'),
    validate(dataUploadBodySchema),
    async (req, res) => {
      const { study } = currentStudy(req);
      const parsed = parseUpload(req.body as ParsedDataUploadBody);
      if (!parsed.ok) {
        const { problems, truncated } = parsed.details;
        const count = truncated ? `More than ${problems.length} problems` : `${problems.length} problem${problems.length === 1 ? '' : 's'}`;
        throw new ApiError(400, 'data_invalid', `${count} in the uploaded files; nothing was stored.`, parsed.details);
      }
      const { replaced } = await replaceStudyData(dataSource, study.id, parsed.data);
      const view = await studyDataView(dataSource, study.id);
      const body: DataUploadResponse = {
        ...view,
        replaced,
        message: `${replaced ? 'Replaced the study data with' : 'Stored'} ${parsed.data.waves.length} waves of ${parsed.data.actors.length} actors and ${parsed.data.covariates.length} covariate${parsed.data.covariates.length === 1 ? '' : 's'}.`,
      };
      res.status(replaced ? 200 : 201).json(body);
    },
  );

  router.get('/:studyId/data/waves/:index', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const index = idParam(req, 'index', 'Wave');
    const result = await waveTies(dataSource, currentStudy(req).study.id, index);
    if (!result) throw notFound(`Wave ${index} not found.`);
    res.json(result);
  });

  return router;
}
