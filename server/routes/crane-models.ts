import { Router } from 'express';
import { z } from 'zod';
import { arrangementDataSchema } from '../../shared/schemas/arrangement.js';
import { craneModelInputSchema } from '../../shared/schemas/fleet.js';
import { saveCraneModel, updateCraneModel } from '../commands/fleet.js';
import type { AppContext } from '../context.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { parseOrThrow } from '../errors.js';
import { authorize } from '../policies/index.js';
import { findByIdOr404 } from './find.js';
import { presentCraneModel, presentCraneModelSummary } from '../presenters/fleet.js';

const importQuerySchema = z.object({ replace: z.enum(['0', '1', 'true', 'false']).optional() });

/** Crane models: list, read, create, change, export and import of the arrangement file. */
export function craneModelsRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;
  const unitCount = (modelId: string) => manager.countBy(CraneUnit, { modelId });

  const load = (id: string) => findByIdOr404(manager, CraneModel, id, 'That crane model');

  router.get('/crane-models', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    const models = await manager.find(CraneModel, { order: { arrangementId: 'ASC' } });
    const items = await Promise.all(models.map(async (m) => presentCraneModelSummary(m, await unitCount(m.id))));
    res.json({ items });
  });

  router.get('/crane-models/:modelId', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    const model = await load(req.params.modelId);
    res.json({ model: presentCraneModel(model, await unitCount(model.id)) });
  });

  router.get('/crane-models/:modelId/arrangement', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    const model = await load(req.params.modelId);
    res.attachment(`${model.arrangementId}.arrangement.json`);
    res.type('application/json').send(JSON.stringify(model.arrangement, null, 2) + '\n');
  });

  router.post('/crane-models', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.change', {}, req.authProblem);
    const { arrangement } = parseOrThrow(craneModelInputSchema, req.body, 'crane model');
    const { model } = await saveCraneModel(context, arrangement, { replace: false });
    res.status(201).json({ model: presentCraneModel(model, 0) });
  });

  // The body is the arrangement file itself; every failing path is listed and nothing is saved.
  router.post('/crane-models/import', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.change', {}, req.authProblem);
    const { replace } = parseOrThrow(importQuerySchema, req.query, 'query');
    const arrangement = parseOrThrow(arrangementDataSchema, req.body, 'arrangement file');
    const { model, created } = await saveCraneModel(context, arrangement, { replace: replace === '1' || replace === 'true' });
    res.status(created ? 201 : 200).json({ model: presentCraneModel(model, await unitCount(model.id)) });
  });

  router.patch('/crane-models/:modelId', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.change', {}, req.authProblem);
    await load(req.params.modelId);
    const { arrangement } = parseOrThrow(craneModelInputSchema, req.body, 'crane model');
    const model = await updateCraneModel(context, req.params.modelId, arrangement);
    res.json({ model: presentCraneModel(model, await unitCount(model.id)) });
  });

  return router;
}
