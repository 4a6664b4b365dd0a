import type { AppContext } from '../context.js';
import { createUser } from '../commands/users.js';
import { User } from '../entities/User.js';
import { seedDemoFleet } from './fleet.js';
import { seedDemoJobs } from './jobs.js';
import { DEMO_PASSWORD, demoPeople } from './people.js';

/**
 * Seeds the invented demo scenario when the database holds no one yet. Everything is created
 * through the same commands the app uses, so the demo's records are genuine.
 * Returns whether it seeded.
 */
export async function seedDemoIfEmpty(context: AppContext): Promise<boolean> {
  const people = await context.queue.transaction(async (manager) => {
    if ((await manager.count(User)) > 0) return null;
    const created = new Map<string, User>();
    for (const person of demoPeople) created.set(person.email, await createUser(manager, { ...person, password: DEMO_PASSWORD }));
    return created;
  });
  if (!people) return false;
  const person = (email: string) => people.get(email)!;
  const fleet = await seedDemoFleet(context, { supervisor: person('supervisor@holdline.test'), rigger: person('rigger@holdline.test') });
  await seedDemoJobs(context, {
    admin: person('admin@holdline.test'),
    supervisor: person('supervisor@holdline.test'),
    supervisor2: person('supervisor2@holdline.test'),
    operator: person('operator@holdline.test'),
    signaller: person('signaller@holdline.test'),
    rigger: person('rigger@holdline.test'),
    rigger2: person('rigger2@holdline.test'),
    viewer: person('viewer@holdline.test'),
  }, fleet);
  return true;
}
