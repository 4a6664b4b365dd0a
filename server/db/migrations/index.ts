import { CreateUsers1764633600000 } from './1764633600000-CreateUsers.js';

/** The migration chain, oldest first. */
export const migrations = [CreateUsers1764633600000];
