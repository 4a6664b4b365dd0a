import { Router } from 'express';
import { componentFilterSchema, createComponentSchema, createInspectionSchema, updateComponentSchema } from '../../shared/schemas/fleet.js';
import { createComponent, recordInspection, updateComponent } from '../commands/fleet.js';
import type { AppContext } from '../context.js';
import { Component } from '../entities/Component.js';
import { parseOrThrow } from '../errors.js';
import { authorize } from '../policies/index.js';
import { findByIdOr404 } from './find.js';
import { componentDetail, inspectionsOf, listComponents, presentComponents } from '../queries/fleet.js';

/** Physical components by serial, and their inspections. */
export function componentsRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;

  const load = (id: string) => findByIdOr404(manager, Component, id, 'That component');

  router.get('/components', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    const filter = parseOrThrow(componentFilterSchema, req.query, 'filter');
    res.json({ items: await listComponents(context, filter) });
  });

  router.get('/components/:componentId', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    const component = await load(req.params.componentId);
    res.json(await componentDetail(context, component.id));
  });

  router.post('/components', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.change', {}, req.authProblem);
    const body = parseOrThrow(createComponentSchema, req.body, 'component');
    const [component] = await presentComponents(context, manager, [await createComponent(context, body)]);
    res.status(201).json({ component });
  });

  router.patch('/components/:componentId', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.change', {}, req.authProblem);
    await load(req.params.componentId);
    const body = parseOrThrow(updateComponentSchema, req.body, 'change');
    const [component] = await presentComponents(context, manager, [await updateComponent(context, req.params.componentId, body)]);
    res.json({ component });
  });

  router.get('/components/:componentId/inspections', async (req, res) => {
    authorize(req.actor ?? null, 'fleet.read', {}, req.authProblem);
    const component = await load(req.params.componentId);
    res.json({ items: await inspectionsOf(context, manager, component.id) });
  });

  router.post('/components/:componentId/inspections', async (req, res) => {
    authorize(req.actor ?? null, 'inspections.record', {}, req.authProblem);
    await load(req.params.componentId);
    const body = parseOrThrow(createInspectionSchema, req.body, 'inspection');
    const actor = req.actor!;
    const { inspection } = await context.queue.transaction((m) => recordInspection(m, req.params.componentId, body, actor, context.now()));
    const detail = await componentDetail(context, req.params.componentId);
    res.status(201).json({ inspection: detail.inspections.find((i) => i.id === inspection.id), component: detail.component });
  });

  return router;
}
