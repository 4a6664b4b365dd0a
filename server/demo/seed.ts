import type { AppContext } from '../context.js';
import { createUser } from '../commands/users.js';
import { User } from '../entities/User.js';
import { DEMO_PASSWORD, demoPeople } from './people.js';

/**
 * Seeds the invented demo scenario when the database holds no one yet. Everything is created
 * through the same commands the app uses, so the demo's records are genuine.
 * Returns whether it seeded.
 */
export async function seedDemoIfEmpty(context: AppContext): Promise<boolean> {
  return context.queue.transaction(async (manager) => {
    if ((await manager.count(User)) > 0) return false;
    for (const person of demoPeople) {
      await createUser(manager, { ...person, password: DEMO_PASSWORD });
    }
    return true;
  });
}
