import type { Qualification } from '../../shared/schemas/users.js';

/** Every demo account uses this password; printed at start in demo mode. */
export const DEMO_PASSWORD = 'holdline-demo';

/** The invented crew of the invented hire company in the demo. */
export const demoPeople: { email: string; displayName: string; qualifications: Qualification[]; isAdmin?: boolean; canInspect?: boolean; note: string }[] = [
  { email: 'admin@holdline.test', displayName: 'Ines Okafor', qualifications: ['viewer'], isAdmin: true, note: 'admin' },
  { email: 'supervisor@holdline.test', displayName: 'Rhys Calloway', qualifications: ['supervisor', 'rigger', 'signaller'], note: 'assembly supervisor' },
  // A viewer too: she watches the depot trial of the crane she takes over (a job's data is its crew's).
  { email: 'supervisor2@holdline.test', displayName: 'Marta Lindqvist', qualifications: ['supervisor', 'signaller', 'viewer'], note: 'second supervisor' },
  { email: 'operator@holdline.test', displayName: 'Tomasz Wierzba', qualifications: ['operator'], note: 'crane operator' },
  { email: 'signaller@holdline.test', displayName: 'Aisha Ndlovu', qualifications: ['signaller', 'rigger'], note: 'signaller' },
  { email: 'rigger@holdline.test', displayName: 'Callum Frey', qualifications: ['rigger'], note: 'rigger' },
  { email: 'rigger2@holdline.test', displayName: 'Priya Raman', qualifications: ['rigger'], canInspect: true, note: 'rigger, qualified to inspect cranes' },
  { email: 'viewer@holdline.test', displayName: 'Noor Haddad', qualifications: ['viewer'], note: "client's engineer, read-only" },
];
