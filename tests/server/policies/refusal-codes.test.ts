import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { refusalCodes } from '../../../shared/schemas/commands.js';

/**
 * `refusalCodes` (shared/schemas/commands.ts) against the server code a board command passes
 * through. The scan starts at both transports and the HTTP pipeline around them, follows every
 * relative import inside server/, and collects the codes written there: `refuse(409, 'x'`,
 * `new HttpError(…, 'x'`, `conflict('x'` and `code: 'x'`. It works module by module, so a module
 * reached for one function brings the codes of its other functions too: those are named below
 * with the reason, and each must still be found where it is said to be.
 */
const root = path.resolve(import.meta.dirname, '..', '..', '..');
const entries = [
  'server/routes/board.ts',
  'server/sockets/index.ts',
  // Every /api request passes these before the route (sign-in) and after it (the error body).
  'server/middlewares/authenticate.ts',
  'server/errors.ts',
];

/** Codes found in reached modules that no board command or board socket event can get. */
const notSentToTheBoard: Record<string, { file: string; why: string }> = {
  fleet_number_taken: { file: 'server/commands/fleet.ts', why: 'the board calls only recordInspection from this module' },
  model_exists: { file: 'server/commands/fleet.ts', why: 'the board calls only recordInspection from this module' },
  serial_taken: { file: 'server/commands/fleet.ts', why: 'the board calls only recordInspection from this module' },
  types_in_use: { file: 'server/commands/fleet.ts', why: 'the board calls only recordInspection from this module' },
  unit_has_components: { file: 'server/commands/fleet.ts', why: 'the board calls only recordInspection from this module' },
  unsupported_image: { file: 'server/commands/uploads.ts', why: 'storing a photo is POST /api/uploads; the board only attaches stored ones' },
  image_mismatch: { file: 'server/commands/uploads.ts', why: 'storing a photo is POST /api/uploads; the board only attaches stored ones' },
  no_plan: { file: 'server/queries/plans.ts', why: 'a readiness reason shown on the plan, not a refusal' },
  plan_stale: { file: 'server/queries/plans.ts', why: 'a readiness reason shown on the plan, not a refusal' },
  second_admin_needed: { file: 'server/errors.ts', why: 'an administrator changing their own account or crew place (PATCH /api/users/:id, PUT /api/jobs/:id/crew), never a board command' },
};

const importPattern = /\bfrom\s+'(\.{1,2}\/[^']+)\.js'/g;
const codePattern = /(?:\brefuse\(\s*\d+\s*,\s*|\bnew HttpError\(\s*[^']*?,\s*|\bconflict\(\s*|\bcode:\s*)'([a-z_]+)'/g;

/** Every server module reachable from the entries by relative imports, with its source. */
function reachedModules(): Map<string, string> {
  const sources = new Map<string, string>();
  const todo = [...entries];
  while (todo.length) {
    const file = todo.pop()!;
    if (sources.has(file)) continue;
    const source = readFileSync(path.join(root, file), 'utf8');
    sources.set(file, source);
    for (const [, specifier] of source.matchAll(importPattern)) {
      const target = path.posix.join(path.posix.dirname(file), `${specifier}.ts`);
      if (target.startsWith('server/') && existsSync(path.join(root, target))) todo.push(target);
    }
  }
  return sources;
}

/** code → the files it is written in. */
function codesIn(sources: Map<string, string>): Map<string, string[]> {
  const found = new Map<string, string[]>();
  for (const [file, source] of sources) {
    for (const [, code] of source.matchAll(codePattern)) found.set(code, [...new Set([...(found.get(code) ?? []), file])]);
  }
  return found;
}

describe('refusalCodes lists every code a board command can be refused with', () => {
  const sources = reachedModules();
  const found = codesIn(sources);
  const listed = new Set<string>(refusalCodes);

  it('reaches the command layer, the policy and both transports', () => {
    for (const file of ['server/commands/board.ts', 'server/commands/job-writer.ts', 'server/policies/index.ts', 'server/sockets/board.ts', 'server/sockets/auth.ts', 'server/routes/job-access.ts']) {
      expect([...sources.keys()]).toContain(file);
    }
  });

  it('finds the codes written in the usual ways', () => {
    // One of each way the scan recognises, so a broken pattern cannot pass by finding nothing.
    expect(found.get('values_mismatch')).toContain('server/commands/board.ts'); // refuse(\n 409,\n 'values_mismatch'
    expect(found.get('role_not_allowed')).toContain('server/policies/index.ts'); // new HttpError(403, 'role_not_allowed'
    expect(found.get('bad_request')).toContain('server/errors.ts'); // new HttpError(err.status … : 400, 'bad_request'
    expect(found.get('component_retired')).toContain('server/commands/fleet.ts'); // conflict('component_retired'
    expect(found.get('no_plan')).toContain('server/queries/plans.ts'); // code: 'no_plan'
  });

  it('has every code the scanned code sends', () => {
    const missing = [...found.keys()].filter((code) => !listed.has(code) && !(code in notSentToTheBoard));
    expect(missing).toEqual([]);
  });

  it('lists no code that is never sent', () => {
    expect(refusalCodes.filter((code) => !found.has(code))).toEqual([]);
  });

  it('names each code left out where it is written, and never one that is listed', () => {
    for (const [code, { file }] of Object.entries(notSentToTheBoard)) {
      expect(found.get(code), code).toContain(file);
      expect(listed.has(code), code).toBe(false);
    }
  });

  it('lists each code once', () => {
    expect(refusalCodes.length).toBe(listed.size);
  });
});
