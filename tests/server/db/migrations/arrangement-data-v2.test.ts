import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openDatabase } from '../../../../server/db/data-source.js';
import { ArrangementDataV21764655200000 } from '../../../../server/db/migrations/1764655200000-ArrangementDataV2.js';
import { arrangementDataSchema, type ArrangementData } from '../../../../shared/schemas/arrangement.js';

/** The demo model written back as a version-1 file: the shape stored before version 2. */
function demoAsVersion1(): Record<string, unknown> {
  const v2 = JSON.parse(readFileSync(path.resolve(import.meta.dirname, '../../../../server/demo/data/crane-model.json'), 'utf8')) as Record<string, unknown> & ArrangementData;
  const { auxSheave: _aux, ...rest } = v2;
  return {
    ...rest,
    schemaVersion: 1,
    arrangements: v2.arrangements.map(({ capacityCharts: _c, ...a }) => ({
      ...a,
      guyLines: a.guyLines.map(({ weightKg: _w, ...g }) => g),
      raising: { ...a.raising, limits: { maxGroundSlopePercent: a.raising.limits.maxGroundSlopePercent, maxBoomHoistLinePullKn: a.raising.limits.maxBoomHoistLinePullKn, tipSupportRequired: a.raising.limits.tipSupportRequired } },
    })),
    drums: v2.drums.map(({ leadToBoomFootM: _l, grooved: _g, firstSheave: _f, ...d }) => d),
    sheaves: v2.sheaves.map(({ hoists: _h, ...s }) => s),
    hookBlocks: v2.hookBlocks.map(({ sheaveBearing: _b, ...b }) => b),
    ropes: v2.ropes.map(({ massKgPerM: _m, ...r }) => r),
    machine: { baseWeightKg: v2.machine.baseWeightKg, cogFromSlewCentreM: v2.machine.cogFromSlewCentreM, cogHeightM: v2.machine.cogHeightM, counterweight: v2.machine.counterweight },
  };
}

describe('arrangement data version 2', () => {
  let dir: string;
  let dataSource: DataSource;
  beforeEach(async () => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'holdline-arr-'));
    dataSource = await openDatabase(path.join(dir, 'h.sqlite'));
  });
  afterEach(async () => {
    if (dataSource.isInitialized) await dataSource.destroy();
    rmSync(dir, { recursive: true, force: true });
  });

  it('a version-1 file still imports: every value it lacks is null or empty, never zero', () => {
    const parsed = arrangementDataSchema.parse(demoAsVersion1());
    expect(parsed.schemaVersion).toBe(2);
    expect(parsed.machine.boomFoot).toBeNull();
    expect(parsed.machine.mast).toBeNull();
    expect(parsed.auxSheave).toBeNull();
    expect(parsed.ropes.every((r) => r.massKgPerM === null)).toBe(true);
    expect(parsed.drums.every((d) => d.leadToBoomFootM === null && d.grooved === null && d.firstSheave === null)).toBe(true);
    // unknown rope path and bearings: the planner counts such sheaves in every hoist's path, at plain bearings
    expect(parsed.sheaves.every((s) => s.hoists === null)).toBe(true);
    expect(parsed.hookBlocks.every((b) => b.sheaveBearing === null)).toBe(true);
    expect(parsed.arrangements.every((a) => a.capacityCharts.length === 0 && a.raising.limits.maxTipLoadKg === null)).toBe(true);
    expect(parsed.arrangements.flatMap((a) => a.guyLines).every((g) => g.weightKg === null)).toBe(true);
  });

  it('the migration rewrites a stored version-1 model as version 2, and the stored file then parses', async () => {
    const v1 = demoAsVersion1();
    const now = new Date().toISOString();
    await dataSource.query('INSERT INTO crane_model (id, arrangement_id, arrangement, created_at, updated_at) VALUES (?, ?, ?, ?, ?)', [
      '00000000-0000-4000-8000-000000000001',
      String(v1.id),
      JSON.stringify(v1),
      now,
      now,
    ]);
    const runner = dataSource.createQueryRunner();
    try {
      await new ArrangementDataV21764655200000().up(runner);
    } finally {
      await runner.release();
    }
    const [row] = (await dataSource.query('SELECT arrangement FROM crane_model')) as { arrangement: string }[];
    const stored = JSON.parse(row.arrangement) as { schemaVersion: number };
    expect(stored.schemaVersion).toBe(2);
    expect(() => arrangementDataSchema.parse(stored)).not.toThrow();
  });

  it('a chart whose capacity rises with radius is refused', () => {
    const v2 = JSON.parse(readFileSync(path.resolve(import.meta.dirname, '../../../../server/demo/data/crane-model.json'), 'utf8')) as ArrangementData;
    v2.arrangements[0].capacityCharts[0].points[1].capacityT = v2.arrangements[0].capacityCharts[0].points[0].capacityT + 1;
    const r = arrangementDataSchema.safeParse(v2);
    expect(r.success).toBe(false);
    expect(JSON.stringify(r.error?.issues)).toContain('capacity must not rise with radius');
  });
});
