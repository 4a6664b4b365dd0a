import { z } from 'zod';

/** Answer of GET /api/health. */
export const healthSchema = z.object({
  status: z.literal('ok'),
  version: z.string(),
  database: z.literal('ok'),
});
export type Health = z.infer<typeof healthSchema>;
