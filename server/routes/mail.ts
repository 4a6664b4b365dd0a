import { Router } from 'express';
import type { AppContext } from '../context.js';
import { authorize } from '../policies/index.js';

/** What the admin sees of the e-mail outbox: sends that failed or wait for another try. */
export function mailRouter(context: AppContext): Router {
  const router = Router();

  router.get('/mail/problems', async (req, res) => {
    authorize(req.actor ?? null, 'mail.problems.read', {}, req.authProblem);
    res.json({ items: await context.outbox.problems() });
  });

  return router;
}
