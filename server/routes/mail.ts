import { Router } from 'express';
import type { InboxMessage } from '../../shared/schemas/audit.js';
import type { AppContext } from '../context.js';
import { notFound } from '../errors.js';
import { authorize } from '../policies/index.js';

/** What stands in for a sign-in or reset link addressed to someone else. */
export const HIDDEN_LINK = '[link hidden: only the person it was sent to can open it]';

/**
 * A message as an admin may see it in the test inbox: a sign-in or reset link (its one-time token)
 * addressed to someone else is cut out, so reading the inbox never lets an admin take over
 * another person's account. Messages to the admin's own address are shown whole.
 */
export function inboxMessageFor(message: InboxMessage, readerEmail: string): InboxMessage {
  if (message.to.includes(readerEmail.toLowerCase())) return message;
  const text = message.text
    .replace(/\bhttps?:\/\/\S*?[?&]token=\S*/gi, HIDDEN_LINK)
    // A token outside a whole URL (a wrapped line, another layout) is cut out too.
    .replace(/([?&]token=)[^\s&#]+/gi, '$1[hidden]')
    .replace(/(\/auth\/links\/)[^\s/?#]+/gi, '$1[hidden]');
  return { ...message, text };
}

/** What the admin sees of the e-mail outbox, and the test inbox when it is switched on. */
export function mailRouter(context: AppContext): Router {
  const router = Router();

  router.get('/mail/problems', async (req, res) => {
    authorize(req.actor ?? null, 'mail.problems.read', {}, req.authProblem);
    res.json({ items: await context.outbox.problems() });
  });

  // Only with HOLDLINE_TEST_INBOX=1 or --test-inbox (npm start, npm run dev) and the local fake mail server.
  router.get('/dev/inbox', (req, res) => {
    authorize(req.actor ?? null, 'inbox.read', {}, req.authProblem);
    const fake = context.mailer.fake;
    if (!context.config.testInbox || !fake) throw notFound('The test inbox');
    const reader = req.actor!.email;
    res.json({ items: fake.messages.map((m) => inboxMessageFor(m, reader)) });
  });

  return router;
}
