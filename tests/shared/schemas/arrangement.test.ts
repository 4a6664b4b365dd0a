// The demo data is invented (Marrowgate Heavy Works is not a real manufacturer); these tests
// check that it parses and that broken data reports each problem with its path.
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { arrangementDataSchema, assistCraneSchema } from '../../../shared/schemas/arrangement';
import { formatSchemaIssues } from '../../../shared/schemas/issues';
import { designFactorCheck, dOverDCheck } from '../../../shared/calc';
import { demoCrane, readDemoJson } from '../helpers';

type Json = Record<string, unknown>;
const clone = (): Json => structuredClone(readDemoJson('crane-model.json')) as Json;
const at = (obj: unknown, ...path: Array<string | number>): Json =>
  path.reduce<unknown>((o, k) => (o as Record<string | number, unknown>)[k], obj) as Json;

describe('demo crane model', () => {
  it('parses with the schema', () => {
    const result = arrangementDataSchema.safeParse(readDemoJson('crane-model.json'));
    expect(result.success ? [] : formatSchemaIssues(result.error)).toEqual([]);
  });

  it('is the invented 250-tonne-class MHW 250L from 18 m to 90 m', () => {
    const crane = demoCrane();
    expect(crane.manufacturer).toBe('Marrowgate Heavy Works');
    expect(crane.model).toBe('MHW 250L');
    const lengths = crane.arrangements.map((a) => a.boomLengthM);
    expect(Math.min(...lengths)).toBe(18);
    expect(Math.max(...lengths)).toBe(90);
    // The largest block is rated 160 t: the most 18 parts can lift within the drum's 150 kN (tests/shared/planner/rope-figures.test.ts).
    expect(Math.max(...crane.hookBlocks.map((b) => b.ratedLoadT))).toBe(160);
  });

  it('its ropes meet the published design factors at the drums\' permissible pull (ASME B30.5 §5-1.7.1)', () => {
    const crane = demoCrane();
    for (const drum of crane.drums) {
      const rope = crane.ropes.find((r) => r.id === drum.ropeId);
      if (!rope) throw new Error(`no rope ${drum.ropeId}`);
      const check = designFactorCheck({
        minimumBreakingForceKn: rope.minimumBreakingForceKn,
        linePullKn: drum.permissibleLinePullKn,
        duty: rope.rotationResistant ? 'rotationResistant' : 'running',
      });
      expect(check.pass, `${drum.id}: ${check.designFactor}`).toBe(true);
    }
  });

  it('its drums, sheaves and blocks meet the D/d minimums (ASME B30.5 §5-1.7.4)', () => {
    const crane = demoCrane();
    const rope = (id: string) => crane.ropes.find((r) => r.id === id)?.diameterMm ?? Number.NaN;
    const hoistRope = rope('R28-hoist');
    for (const drum of crane.drums) {
      expect(dOverDCheck({ pitchDiameterMm: drum.pitchDiameterMm, ropeDiameterMm: rope(drum.ropeId), element: drum.role === 'boomHoist' ? 'boomHoistSheave' : 'drum' }).pass).toBe(true);
    }
    // Idlers and guide sheaves carry the hoist rope too: load hoisting sheaves, 18d.
    for (const s of crane.sheaves) {
      const d = s.role === 'boomHoist' ? rope('R22-boom') : hoistRope;
      expect(dOverDCheck({ pitchDiameterMm: s.pitchDiameterMm, ropeDiameterMm: d, element: s.role === 'boomHoist' ? 'boomHoistSheave' : 'loadSheave' }).pass).toBe(true);
    }
    for (const b of crane.hookBlocks) {
      if (b.sheavePitchDiameterMm !== null) {
        expect(dOverDCheck({ pitchDiameterMm: b.sheavePitchDiameterMm, ropeDiameterMm: hoistRope, element: 'lowerBlockSheave' }).pass).toBe(true);
      }
    }
  });

  it('the assist crane data parses', () => {
    const r = assistCraneSchema.safeParse(readDemoJson('assist-crane.json'));
    expect(r.success).toBe(true);
  });
});

describe('schema errors name their paths (formatSchemaIssues)', () => {
  it('reports each field error of a broken file with its dotted path', () => {
    const bad = clone();
    at(bad, 'sectionTypes', 0).lengthM = -8;
    delete at(bad, 'hookBlocks', 1).weightKg;
    at(bad, 'sheaves', 2).bearing = 'bronze';
    at(bad, 'arrangements', 3, 'wind', 'raising').gustMs = 'strong';
    const result = arrangementDataSchema.safeParse(bad);
    expect(result.success).toBe(false);
    if (result.success) return;
    const paths = formatSchemaIssues(result.error).map((i) => i.path);
    // A negative length also puts the section's centre of gravity outside it: both are reported.
    expect([...paths].sort()).toEqual(
      [
        'arrangements.3.wind.raising.gustMs',
        'hookBlocks.1.weightKg',
        'sectionTypes.0.cogFromFootM',
        'sectionTypes.0.lengthM',
        'sheaves.2.bearing',
      ],
    );
    for (const issue of formatSchemaIssues(result.error)) expect(issue.message.length).toBeGreaterThan(0);
  });

  it('reports cross-reference errors: unknown section, wrong sum, unknown rope, impossible counterweight', () => {
    const bad = clone();
    at(bad, 'arrangements', 2).sectionTypeIds = ['base', 'ins9', 'ins3', 'tip'];
    at(bad, 'arrangements', 4).boomLengthM = 31;
    at(bad, 'drums', 0).ropeId = 'R99';
    at(bad, 'arrangements', 0, 'raising').counterweightKg = 60000;
    const result = arrangementDataSchema.safeParse(bad);
    expect(result.success).toBe(false);
    if (result.success) return;
    const issues = formatSchemaIssues(result.error);
    expect(issues).toEqual(
      expect.arrayContaining([
        { path: 'arrangements.2.sectionTypeIds.1', message: 'unknown section type "ins9"' },
        { path: 'arrangements.4.sectionTypeIds', message: 'sections add up to 30 m, not 31 m' },
        { path: 'drums.0.ropeId', message: 'unknown rope "R99"' },
        { path: 'arrangements.0.raising.counterweightKg', message: 'counterweight 60000 kg cannot be made from the blocks in their fitting order' },
      ]),
    );
  });

  it('flags a chart whose capacity rises with radius', () => {
    const bad = structuredClone(readDemoJson('assist-crane.json')) as Json;
    at(bad, 'charts', 0, 'points', 3).capacityT = 99;
    const result = assistCraneSchema.safeParse(bad);
    expect(result.success).toBe(false);
    if (!result.success) expect(formatSchemaIssues(result.error).map((i) => i.path)).toContain('charts.0.points.3.capacityT');
  });

  it('a root-level error has an empty path', () => {
    const result = z.object({ a: z.number() }).safeParse(42);
    expect(result.success).toBe(false);
    if (!result.success) expect(formatSchemaIssues(result.error)).toEqual([{ path: '', message: expect.any(String) }]);
  });
});
