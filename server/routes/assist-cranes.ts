import { Router } from 'express';
import { createAssistCraneSchema } from '../../shared/schemas/fleet.js';
import { createAssistCrane } from '../commands/fleet.js';
import type { AppContext } from '../context.js';
import { AssistCrane } from '../entities/AssistCrane.js';
import { parseOrThrow } from '../errors.js';
import { authorize } from '../policies/index.js';
import { findByIdOr404 } from './find.js';
import { presentAssistCrane } from '../presenters/fleet.js';

/** Assist cranes with their charts. */
export function assistCranesRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;

  router.get('/assist-cranes', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    res.json({ items: (await manager.find(AssistCrane, { order: { fleetNumber: 'ASC' } })).map(presentAssistCrane) });
  });

  router.get('/assist-cranes/:assistCraneId', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    const crane = await findByIdOr404(manager, AssistCrane, req.params.assistCraneId, 'That assist crane');
    res.json({ assistCrane: presentAssistCrane(crane) });
  });

  router.post('/assist-cranes', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.change', {}, req.authProblem);
    const body = parseOrThrow(createAssistCraneSchema, req.body, 'assist crane');
    res.status(201).json({ assistCrane: presentAssistCrane(await createAssistCrane(context, body)) });
  });

  return router;
}
