import { randomUUID } from 'node:crypto';
import type { EntityManager } from 'typeorm';
import { SignInLink, type SignInLinkKind } from '../entities/SignInLink.js';
import { User } from '../entities/User.js';
import { accountInactive, HttpError } from '../errors.js';
import { randomToken, sha256Hex } from './hash.js';

/** How long each kind of e-mailed link works. */
export const LINK_TTL_MS: Record<SignInLinkKind, number> = {
  invitation: 72 * 60 * 60 * 1000,
  reset: 60 * 60 * 1000,
};

/** Creates a link and returns its raw token (only ever sent by e-mail). Older unused links of the same kind stop working. */
export async function createSignInLink(manager: EntityManager, userId: string, kind: SignInLinkKind, now: Date): Promise<{ token: string; expiresAt: string }> {
  await manager
    .createQueryBuilder()
    .update(SignInLink)
    .set({ usedAt: now.toISOString() })
    .where('user_id = :userId AND kind = :kind AND used_at IS NULL', { userId, kind })
    .execute();
  const token = randomToken();
  const expiresAt = new Date(now.getTime() + LINK_TTL_MS[kind]).toISOString();
  await manager.insert(SignInLink, { id: randomUUID(), userId, kind, tokenHash: sha256Hex(token), createdAt: now.toISOString(), expiresAt, usedAt: null });
  return { token, expiresAt };
}

/** Finds a usable link and its person, or throws the error a person can act on. */
export async function findUsableLink(manager: EntityManager, token: string, now: Date): Promise<{ link: SignInLink; user: User }> {
  const link = await manager.findOneBy(SignInLink, { tokenHash: sha256Hex(token) });
  if (!link) throw new HttpError(404, 'link_invalid', 'This link is not valid. Check that you opened the whole link from the e-mail.');
  const again = link.kind === 'invitation' ? 'Ask your administrator to send a new invitation.' : 'Request a new reset link from the sign-in page.';
  if (link.usedAt) throw new HttpError(409, 'link_used', `This link has already been used. ${again}`);
  if (now.getTime() >= Date.parse(link.expiresAt)) throw new HttpError(410, 'link_expired', `This link has expired. ${again}`);
  const user = await manager.findOneBy(User, { id: link.userId });
  if (!user || !user.active) throw accountInactive();
  return { link, user };
}
