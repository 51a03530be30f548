/**
 * /api/studies/:studyId/models: model specifications (write: lead, statistician; read: members) and
 * their fits (start and cancel: lead, statistician; read: members). The contract is in shared/models.ts.
 */
import { Router, type Request } from 'express';
import { SCORE_TEST_RUNS, scoreTestsOf } from './scoreTests';
import type { ApiErrorCode } from '../../shared/api';
import {
  modelSpecBodySchema,
  modelUpdateBodySchema,
  startFitBodySchema,
  type ParsedModelSpecBody,
  type ParsedStartFitBody,
} from '../../shared/models';
import { currentStudy, currentUser } from '../auth/context';
import { badRequest, idParam, notFound, validate } from '../errors';
import type { RouteDeps } from '../deps';
import './jobKind';
import { cancelFit, fitDetail, getFitRow, listFits, startFit } from './fits';
import { getModelRow } from './rows';
import { checkModel, createModel, deleteModel, listModels, modelDetail, updateModel, type ModelUpdate } from './service';

export function modelsRouter(deps: RouteDeps): Router {
  const { dataSource, auth } = deps;
  const router = Router();

  const loadModel = (req: Request) => {
    const { study } = currentStudy(req);
    const modelId = idParam(req, 'modelId', 'Model');
    const row = getModelRow(dataSource, study.id, modelId);
    if (!row) throw notFound('Model not found.');
    return row;
  };
  const loadFit = (req: Request) => {
    const model = loadModel(req);
    const fitId = idParam(req, 'fitId', 'Fit');
    const row = getFitRow(dataSource, model.studyId, model.id, fitId);
    if (!row) throw notFound('Fit not found.');
    return { model, row };
  };

  router.get('/:studyId/models', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    const { study } = currentStudy(req);
    res.json({ models: listModels(dataSource, study.id) });
  });

  router.post(
    '/:studyId/models/check',
    auth.requireUser,
    auth.requireStudyRole('read'),
    validate(modelSpecBodySchema),
    async (req, res) => {
      const { study } = currentStudy(req);
      res.json({ notes: await checkModel(dataSource, study.id, req.body as ParsedModelSpecBody) });
    },
  );

  router.post(
    '/:studyId/models',
    auth.requireUser,
    auth.requireStudyRole('editModels'),
    validate(modelSpecBodySchema),
    async (req, res) => {
      const { study } = currentStudy(req);
      const id = await createModel(dataSource, study.id, currentUser(req).id, req.body as ParsedModelSpecBody);
      res.status(201).json({ model: await modelDetail(dataSource, getModelRow(dataSource, study.id, id)!) });
    },
  );

  router.get(
    '/:studyId/models/:modelId',
    auth.requireUser,
    auth.requireStudyRole('read'),
    async (req, res) => {
      res.json({ model: await modelDetail(dataSource, loadModel(req)) });
    },
  );

  router.patch(
    '/:studyId/models/:modelId',
    auth.requireUser,
    auth.requireStudyRole('editModels'),
    validate(modelUpdateBodySchema),
    async (req, res) => {
      const row = loadModel(req);
      await updateModel(dataSource, row, req.body as ModelUpdate);
      res.json({ model: await modelDetail(dataSource, getModelRow(dataSource, row.studyId, row.id)!) });
    },
  );

  router.delete(
    '/:studyId/models/:modelId',
    auth.requireUser,
    auth.requireStudyRole('editModels'),
    async (req, res) => {
      await deleteModel(dataSource, loadModel(req));
      res.status(204).end();
    },
  );

  router.get('/:studyId/models/:modelId/fits', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    const model = loadModel(req);
    res.json({ fits: listFits(dataSource, model.studyId, model.id) });
  });

  router.post(
    '/:studyId/models/:modelId/fits',
    auth.requireUser,
    auth.requireStudyRole('runBatches'),
    validate(startFitBodySchema),
    async (req, res) => {
      const model = loadModel(req);
      const fitId = await startFit(dataSource, model, currentUser(req).id, req.body as ParsedStartFitBody);
      res.status(201).json({ fit: fitDetail(dataSource, getFitRow(dataSource, model.studyId, model.id, fitId)!) });
    },
  );

  router.get('/:studyId/models/:modelId/fits/:fitId', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    const { row } = loadFit(req);
    res.json({ fit: fitDetail(dataSource, row) });
  });

  router.get('/:studyId/models/:modelId/fits/:fitId/score-tests', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const { model, row } = loadFit(req);
    const raw = req.query.runs;
    const runs = raw === undefined || raw === '' ? SCORE_TEST_RUNS : Number(raw);
    if (!Number.isInteger(runs) || runs < 20 || runs > 500) throw badRequest('The number of simulations (runs) is a whole number from 20 to 500.');
    res.json(await scoreTestsOf(dataSource, model, row, runs));
  });

  router.post(
    '/:studyId/models/:modelId/fits/:fitId/cancel',
    auth.requireUser,
    auth.requireStudyRole('runBatches'),
    async (req, res) => {
      const { model, row } = loadFit(req);
      await cancelFit(dataSource, row);
      res.json({ fit: fitDetail(dataSource, getFitRow(dataSource, model.studyId, model.id, row.id)!) });
    },
  );

  return router;
}
