// Test helpers for the shared project: demo data loading and result scanning.
import { readFileSync } from 'node:fs';
import { expect } from 'vitest';
import { CalcInputError } from '../../shared/calc';
import { fileURLToPath } from 'node:url';
import { arrangementDataSchema, assistCraneSchema } from '../../shared/schemas/arrangement';
import type { ArrangementData, AssistCrane, InventoryItem } from '../../shared/schemas/arrangement';

const dataDir = fileURLToPath(new URL('../../server/demo/data/', import.meta.url));

/** Raw JSON of a demo data file. */
export function readDemoJson(name: string): unknown {
  return JSON.parse(readFileSync(dataDir + name, 'utf8')) as unknown;
}

/** The invented demo crane model, parsed by the schema. */
export function demoCrane(): ArrangementData {
  return arrangementDataSchema.parse(readDemoJson('crane-model.json'));
}

/** The invented demo assist crane, parsed by the schema. */
export function demoAssistCrane(): AssistCrane {
  return assistCraneSchema.parse(readDemoJson('assist-crane.json'));
}

/** Every number anywhere inside a value. */
export function allNumbers(value: unknown, out: number[] = []): number[] {
  if (typeof value === 'number') out.push(value);
  else if (Array.isArray(value)) for (const v of value) allNumbers(v, out);
  else if (value !== null && typeof value === 'object') for (const v of Object.values(value)) allNumbers(v, out);
  return out;
}

/** Relative difference |a − b| / |b|. */
export function relErr(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

/** Asserts fn throws a CalcInputError naming exactly `field`. */
export function expectCalcError(fn: () => unknown, field: string): void {
  let caught: unknown = null;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(CalcInputError);
  expect((caught as CalcInputError).field).toBe(field);
}

/** Every part the demo crane's longest boom needs, hoist ropes and hook blocks included, all serviceable. */
export function demoKit(serialPrefix: string): InventoryItem[] {
  const items: [InventoryItem['kind'], string, number][] = [
    ['section', 'base', 1], ['section', 'ins3', 1], ['section', 'ins6', 1], ['section', 'ins12', 6], ['section', 'tip', 1],
    ['guy_line', 'GT', 2], ['guy_line', 'GB', 2], ['guy_line', 'G3', 2], ['guy_line', 'G6', 2], ['guy_line', 'G12', 12],
    ['hook_block', 'HB160', 1], ['hook_block', 'HB120', 1], ['hook_block', 'BALL12', 1], ['rope', 'R28-hoist', 2], ['rope', 'R22-boom', 1],
  ];
  return items.flatMap(([kind, typeId, n]) => Array.from({ length: n }, (_, i) => ({ serial: `${serialPrefix}-${typeId}-${i}`, kind, typeId, status: 'serviceable' as const })));
}
