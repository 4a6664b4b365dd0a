import { CreateUsers1764633600000 } from './1764633600000-CreateUsers.js';
import { CreateSessions1764637200000 } from './1764637200000-CreateSessions.js';

/** The migration chain, oldest first. */
export const migrations = [CreateUsers1764633600000, CreateSessions1764637200000];
