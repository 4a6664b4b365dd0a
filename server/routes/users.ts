import { Router } from 'express';
import { z } from 'zod';
import { inviteUserSchema, updatePreferencesSchema, updateUserSchema } from '../../shared/schemas/users.js';
import { inviteUser, resendInvitation, updatePreferences, updateUser } from '../commands/users.js';
import type { AppContext } from '../context.js';
import { User } from '../entities/User.js';
import { notFound, parseOrThrow } from '../errors.js';
import { authorize } from '../policies/index.js';
import { presentUser } from '../presenters/user.js';

const listQuerySchema = z.object({ q: z.string().trim().max(100).optional() });

/** People: list, invite, read, change (admins; a person may read themselves). */
export function usersRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;

  router.get('/users', async (req, res) => {
    authorize(req.actor ?? null, 'users.list', {}, req.authProblem);
    const { q } = parseOrThrow(listQuerySchema, req.query, 'search');
    const query = manager.createQueryBuilder(User, 'u').orderBy('u.display_name', 'ASC');
    if (q) query.where('(u.display_name LIKE :q OR u.email LIKE :q)', { q: `%${q.replace(/[%_]/g, '')}%` });
    res.json({ items: (await query.getMany()).map(presentUser) });
  });

  router.post('/users', async (req, res) => {
    authorize(req.actor ?? null, 'users.invite', {}, req.authProblem);
    const body = parseOrThrow(inviteUserSchema, req.body, 'invitation');
    const user = await inviteUser(context, body, req.actor!);
    res.status(201).json({ user: presentUser(user) });
  });

  router.get('/users/:userId', async (req, res) => {
    authorize(req.actor ?? null, 'users.read', { userId: req.params.userId }, req.authProblem);
    const user = await manager.findOneBy(User, { id: req.params.userId });
    if (!user) throw notFound('That person');
    res.json({ user: presentUser(user) });
  });

  router.patch('/users/:userId', async (req, res) => {
    authorize(req.actor ?? null, 'users.update', { userId: req.params.userId }, req.authProblem);
    const body = parseOrThrow(updateUserSchema, req.body, 'change');
    const user = await updateUser(context, req.params.userId, body, req.actor!, req.ip ?? null);
    res.json({ user: presentUser(user) });
  });

  router.patch('/users/:userId/preferences', async (req, res) => {
    authorize(req.actor ?? null, 'users.preferences', { userId: req.params.userId }, req.authProblem);
    const body = parseOrThrow(updatePreferencesSchema, req.body, 'settings');
    const user = await updatePreferences(context, req.params.userId, body);
    res.json({ user: presentUser(user) });
  });

  router.post('/users/:userId/invitation', async (req, res) => {
    authorize(req.actor ?? null, 'users.invite', { userId: req.params.userId }, req.authProblem);
    await resendInvitation(context, req.params.userId, req.actor!);
    res.status(202).json({ message: 'Invitation sent.' });
  });

  router.get('/crew-candidates', async (req, res) => {
    authorize(req.actor ?? null, 'people.candidates', {}, req.authProblem);
    const people = await manager.find(User, { where: { active: true }, order: { displayName: 'ASC' } });
    res.json({ items: people.map((u) => ({ id: u.id, displayName: u.displayName, qualifications: u.qualifications })) });
  });

  return router;
}
