import { Router } from 'express';
import { boomMakeup } from '../../shared/calc/boom.js';
import { boomMakeupQuerySchema, createCraneUnitSchema, updateCraneUnitSchema } from '../../shared/schemas/fleet.js';
import { createCraneUnit, updateCraneUnit } from '../commands/fleet.js';
import type { AppContext } from '../context.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { parseOrThrow } from '../errors.js';
import { authorize } from '../policies/index.js';
import { findByIdOr404 } from './find.js';
import { presentUnits, unitInventory } from '../queries/fleet.js';

/** Crane units by fleet number, and what boom each can build from its serviceable parts. */
export function craneUnitsRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;

  const load = (id: string) => findByIdOr404(manager, CraneUnit, id, 'That crane unit');

  router.get('/crane-units', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    res.json({ items: await presentUnits(manager, await manager.find(CraneUnit, { order: { fleetNumber: 'ASC' } })) });
  });

  router.get('/crane-units/:unitId', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    const [unit] = await presentUnits(manager, [await load(req.params.unitId)]);
    res.json({ unit });
  });

  router.get('/crane-units/:unitId/boom-makeup', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    const unit = await load(req.params.unitId);
    const { lengthM } = parseOrThrow(boomMakeupQuerySchema, req.query, 'query');
    const model = await manager.findOneByOrFail(CraneModel, { id: unit.modelId });
    res.json({ makeup: boomMakeup(model.arrangement, lengthM, await unitInventory(manager, unit)) });
  });

  router.post('/crane-units', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.change', {}, req.authProblem);
    const body = parseOrThrow(createCraneUnitSchema, req.body, 'crane unit');
    const [unit] = await presentUnits(manager, [await createCraneUnit(context, body)]);
    res.status(201).json({ unit });
  });

  router.patch('/crane-units/:unitId', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.change', {}, req.authProblem);
    await load(req.params.unitId);
    const body = parseOrThrow(updateCraneUnitSchema, req.body, 'change');
    const [unit] = await presentUnits(manager, [await updateCraneUnit(context, req.params.unitId, body)]);
    res.json({ unit });
  });

  return router;
}
