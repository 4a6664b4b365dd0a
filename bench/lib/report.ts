import { readFileSync, writeFileSync, mkdirSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Correctness, Figure, ScenarioResult, Spread, System } from './types.js';

/** The machine a run was taken on: the numbers mean little without it. */
export interface Machine {
  nproc: number;
  totalMemoryBytes: number;
  node: string;
  cpuModel: string;
}

/** What `bench/results/latest.json` holds. */
export interface RunReport {
  machine: Machine;
  /** When the run started (ISO). */
  date: string;
  quick: boolean;
  /** The scenarios asked for with `--only`, or null for all. */
  only: string[] | null;
  results: ScenarioResult[];
  /** Scenarios that threw, with the message. */
  failures: { id: string; error: string }[];
  /** Scenarios whose module is not in bench/scenarios yet. */
  missing: string[];
  durationSeconds: number;
  /** Wall time of each scenario run, in seconds (the quick run must fit in two minutes, the full one in ten). */
  scenarioSeconds: Record<string, number>;
}

export const START_MARKER = '<!-- latest:start -->';
export const END_MARKER = '<!-- latest:end -->';

/** nproc, memory, Node version and CPU model of this machine. */
export function machine(): Machine {
  return { nproc: os.availableParallelism(), totalMemoryBytes: os.totalmem(), node: process.version, cpuModel: os.cpus()[0]?.model.trim() ?? 'unknown' };
}

/** The machine in one line, for the terminal and the README. */
export function machineLine(m: Machine, date: string): string {
  return `${m.nproc} CPUs (${m.cpuModel}), ${(m.totalMemoryBytes / 2 ** 30).toFixed(1)} GiB memory, Node ${m.node}, ${date}`;
}

/** A number at a precision its size deserves: 4,512 / 45.1 / 4.51 / 0.451. */
export function formatNumber(n: number): string {
  if (!Number.isFinite(n)) return 'n/a';
  const abs = Math.abs(n);
  if (abs >= 100) return Math.round(n).toLocaleString('en-US');
  if (abs >= 10) return n.toFixed(1);
  if (abs >= 1) return n.toFixed(2);
  return n.toPrecision(2);
}

/** `median [min–max] unit`, or the single value when every round agreed or there was one. */
export function formatSpread(spread: Spread | undefined, unit: string): string {
  if (!spread) return '—';
  const median = `${formatNumber(spread.median)} ${unit}`;
  if (spread.runs.length < 2 || spread.min === spread.max) return median;
  return `${median} [${formatNumber(spread.min)}–${formatNumber(spread.max)}]`;
}

const MAIN_SYSTEMS: System[] = ['holdline', 'relay', 'sqlite-relay'];
const HEADER = ['figure', 'holdline', 'relay', 'sqlite-relay', 'other', 'ratio', 'target', 'met'];

function rowOf(figure: Figure): string[] {
  const other = (Object.keys(figure.values) as System[])
    .filter((s) => !MAIN_SYSTEMS.includes(s))
    .map((s) => `${s}: ${formatSpread(figure.values[s], figure.unit)}`)
    .join('; ');
  const met = figure.target ? (figure.target.met === null ? '—' : figure.target.met ? 'yes' : 'NO') : '';
  return [
    figure.label,
    ...MAIN_SYSTEMS.map((s) => formatSpread(figure.values[s], figure.unit)),
    other || '—',
    figure.ratio ? `${figure.ratio.value.toFixed(2)}× ${figure.ratio.against}` : '—',
    figure.target?.text ?? '—',
    met,
  ];
}

/** A markdown table, padded so it reads in a terminal too. */
function markdownTable(rows: string[][]): string[] {
  const widths = rows[0].map((_, c) => Math.max(3, ...rows.map((r) => r[c].length)));
  const line = (cells: string[]) => `| ${cells.map((cell, c) => cell.padEnd(widths[c])).join(' | ')} |`;
  return [line(rows[0]), line(widths.map((w) => '-'.repeat(w))), ...rows.slice(1).map(line)];
}

/** "gaps 0, duplicates 0, lost acks 0, rejected 0". */
export function correctnessLine(c: Correctness): string {
  return `gaps ${c.gaps}, duplicates ${c.duplicates}, lost acks ${c.lostAcks}, rejected ${c.rejected}`;
}

/** True when any of the four counts is not zero. */
export function hasErrors(c: Correctness): boolean {
  return c.gaps + c.duplicates + c.lostAcks + c.rejected !== 0;
}

/** One scenario: its table, its correctness counts and its notes, as markdown lines. */
export function scenarioSection(result: ScenarioResult): string[] {
  const lines = [`### ${result.title} (\`${result.id}\`)`, ''];
  if (result.figures.length > 0) lines.push(...markdownTable([HEADER, ...result.figures.map(rowOf)]));
  else lines.push('(no figures)');
  lines.push('', `Correctness: ${correctnessLine(result.correctness)}${hasErrors(result.correctness) ? ' — NOT ZERO' : ''}`);
  for (const note of result.notes) lines.push(`- ${note}`);
  return lines;
}

/** The whole run as markdown: the machine line, every scenario, and what failed or is missing. */
export function runSection(report: RunReport): string {
  const lines = [`Machine: ${machineLine(report.machine, report.date)}. ${report.quick ? 'Quick run' : 'Full run'}, ${Math.round(report.durationSeconds)} s.`, ''];
  lines.push('Values are medians of the rounds with [min–max]; a ratio is Holdline’s median over the baseline’s.', '');
  for (const result of report.results) lines.push(...scenarioSection(result), '');
  for (const failure of report.failures) lines.push(`- Scenario \`${failure.id}\` FAILED: ${failure.error.split('\n')[0]}`);
  for (const id of report.missing) lines.push(`- Scenario \`${id}\` is not in bench/scenarios yet.`);
  const times = Object.entries(report.scenarioSeconds ?? {}).map(([id, seconds]) => `${id} ${Math.round(seconds)} s`);
  if (times.length > 0) lines.push('', `Time per scenario: ${times.join(', ')}.`);
  return `${lines.join('\n').trimEnd()}\n`;
}

/** Writes `latest.json` (NaN becomes null, as JSON has no NaN). */
export function writeLatest(file: string, report: RunReport): void {
  mkdirSync(path.dirname(file), { recursive: true });
  writeFileSync(file, `${JSON.stringify(report, null, 2)}\n`);
}

/** Replaces what lies between the two markers of the README with `section`; throws when a marker is missing. */
export function updateReadme(file: string, section: string): void {
  const text = readFileSync(file, 'utf8');
  const start = text.indexOf(START_MARKER);
  const end = text.indexOf(END_MARKER);
  if (start < 0 || end < start) throw new Error(`${file} has no ${START_MARKER} … ${END_MARKER} section`);
  writeFileSync(file, `${text.slice(0, start + START_MARKER.length)}\n${section}${text.slice(end)}`);
}
