import { z } from 'zod';

/** What the server last saw when writing to its database (server/db/faults.ts). */
export const storageStatusSchema = z.object({
  ok: z.boolean(),
  /** When the fault that stands began; null when writing works. */
  since: z.string().nullable(),
  /** The latest fault, kept after it clears. */
  lastFault: z
    .object({
      code: z.enum(['storage_full', 'storage_busy', 'storage_readonly', 'storage_failed']),
      message: z.string(),
      systemCode: z.string(),
      at: z.string(),
    })
    .nullable(),
  /** When a write last succeeded after a fault. */
  clearedAt: z.string().nullable(),
});

/**
 * Answer of GET /api/health: 200 with `status: 'ok'` while the database answers and writes work;
 * 503 with `status: 'faulted'` while a storage fault stands (until a write commits again) or while
 * the server is shutting down.
 */
export const healthSchema = z.object({
  status: z.enum(['ok', 'faulted', 'restarting']),
  version: z.string(),
  database: z.literal('ok'),
  storage: storageStatusSchema,
});
export type Health = z.infer<typeof healthSchema>;
