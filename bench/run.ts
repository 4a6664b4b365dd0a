/**
 * `npm run bench [-- --quick] [--only a,b]`: runs the scenarios in order, prints each one's table
 * and correctness counts, writes bench/results/latest.json and, after a full run of every
 * scenario, the generated section of bench/README.md. Exits non-zero when a scenario failed,
 * measured no Holdline figure, or a correctness count is not zero. Every process it started is killed on the way out, Ctrl-C too.
 */
import { execFile } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { parseArgs, promisify } from 'node:util';
import { clientBuilds } from './lib/builds.js';
import { templateFor } from './lib/holdline.js';
import { descendantsOf, killTracked } from './lib/proc.js';
import { correctnessLine, hasErrors, machine, machineLine, runSection, scenarioSection, updateReadme, writeLatest, type RunReport } from './lib/report.js';
import type { Scenario, ScenarioResult } from './lib/types.js';

const SCENARIOS = ['latency', 'throughput', 'resync', 'memory', 'client', 'documents'] as const;
const benchDir = import.meta.dirname;

const log = (line: string) => process.stdout.write(`[${new Date().toISOString().slice(11, 19)}] ${line}\n`);

/** The scenario function of a module: its default export, the export named after it, or `scenario`. */
function scenarioOf(module: Record<string, unknown>, id: string): Scenario {
  const found = [module.default, module[id], module.scenario].find((value) => typeof value === 'function');
  if (!found) throw new Error(`bench/scenarios/${id}.ts exports no scenario (a default export, \`${id}\` or \`scenario\`)`);
  return found as Scenario;
}

async function main(): Promise<number> {
  const { values } = parseArgs({ options: { quick: { type: 'boolean', default: false }, only: { type: 'string' } } });
  const only = values.only ? values.only.split(',').map((s) => s.trim()).filter(Boolean) : null;
  const unknown = (only ?? []).filter((id) => !(SCENARIOS as readonly string[]).includes(id));
  if (unknown.length > 0) {
    process.stderr.write(`unknown scenario(s): ${unknown.join(', ')}; known: ${SCENARIOS.join(', ')}\n`);
    return 2;
  }
  const quick = values.quick;
  const started = performance.now();
  const report: RunReport = { machine: machine(), date: new Date().toISOString(), quick, only, results: [], failures: [], missing: [], durationSeconds: 0, scenarioSeconds: {} };
  log(`bench${quick ? ' (quick)' : ''} on ${machineLine(report.machine, report.date)}`);

  // What the scenarios share and what takes longest to make, before anything is measured: the
  // seeded demo (every scenario's Holdline is a copy of it) and the client builds (scenario 5),
  // side by side; both kept between runs while their inputs do not change (bench/lib/cache.ts).
  const wanted = SCENARIOS.filter((id) => (!only || only.includes(id)) && existsSync(path.join(benchDir, 'scenarios', `${id}.ts`)));
  const preparing = performance.now();
  const [template, builds, browser] = await Promise.allSettled([
    wanted.length > 0 ? templateFor() : Promise.resolve(null),
    wanted.includes('client') ? clientBuilds() : Promise.resolve(null),
    // Scenario 5 drives Debian's Chromium, installed here as for `npm test` when it is missing.
    wanted.includes('client') ? promisify(execFile)('bash', [path.join(benchDir, '..', 'scripts', 'ensure-chromium.sh')]) : Promise.resolve(null),
  ]);
  const made = (seconds: number | null) => (seconds === null ? 'reused' : `made in ${seconds.toFixed(1)} s`);
  const parts: string[] = [];
  // A failure here is not fatal: the scenarios that need it try again and fail with their own message.
  if (template.status === 'rejected') parts.push(`seeding the demo FAILED (${String(template.reason).split('\n')[0]})`);
  else if (template.value) parts.push(`seeded demo ${made(template.value.seededSeconds)}`);
  if (builds.status === 'rejected') parts.push(`the client build FAILED (${String(builds.reason).split('\n')[0]})`);
  else if (builds.value) parts.push(`client build ${made(builds.value.holdline.seconds)}, empty page ${made(builds.value.empty.seconds)}`);
  if (browser.status === 'rejected') parts.push(`Chromium is MISSING (${String((browser.reason as { stderr?: string }).stderr ?? browser.reason).trim().split('\n')[0]})`);
  report.scenarioSeconds.prepare = (performance.now() - preparing) / 1000;
  log(`prepared in ${report.scenarioSeconds.prepare.toFixed(1)} s: ${parts.join('; ') || 'nothing to prepare'}`);

  // Processes below the runner before any scenario (tsx's esbuild service) outlive every scenario.
  const beforeScenarios = new Set(descendantsOf(process.pid));
  for (const id of SCENARIOS) {
    if (only && !only.includes(id)) continue;
    if (!existsSync(path.join(benchDir, 'scenarios', `${id}.ts`))) {
      log(`${id}: not in bench/scenarios yet, skipped`);
      report.missing.push(id);
      continue;
    }
    const begun = performance.now();
    log(`${id}: start`);
    try {
      const scenario = scenarioOf((await import(`./scenarios/${id}.js`)) as Record<string, unknown>, id);
      const result: ScenarioResult = await scenario({ quick, log: (line) => log(`  ${line}`) });
      report.results.push(result);
      log(`${id}: done in ${((performance.now() - begun) / 1000).toFixed(1)} s; ${correctnessLine(result.correctness)}`);
    } catch (error) {
      const message = error instanceof Error ? (error.stack ?? error.message) : String(error);
      report.failures.push({ id, error: message });
      log(`${id}: FAILED after ${((performance.now() - begun) / 1000).toFixed(1)} s: ${message}`);
    }
    report.scenarioSeconds[id] = (performance.now() - begun) / 1000;
    // A scenario that left a process behind must not weigh on the next one's numbers.
    killTracked(beforeScenarios, true);
  }

  report.durationSeconds = (performance.now() - started) / 1000;
  process.stdout.write('\n');
  for (const result of report.results) process.stdout.write(`${scenarioSection(result).join('\n')}\n\n`);
  for (const failure of report.failures) process.stdout.write(`Scenario ${failure.id} FAILED: ${failure.error.split('\n')[0]}\n`);
  if (report.missing.length > 0) process.stdout.write(`Not in bench/scenarios yet: ${report.missing.join(', ')}\n`);
  process.stdout.write(`Time per scenario: ${Object.entries(report.scenarioSeconds).map(([id, s]) => `${id} ${s.toFixed(1)} s`).join(', ')}\n`);

  const latest = path.join(benchDir, 'results', 'latest.json');
  writeLatest(latest, report);
  log(`wrote ${path.relative(process.cwd(), latest)}`);
  if (!quick && !only) {
    updateReadme(path.join(benchDir, 'README.md'), runSection(report));
    log('wrote the latest table into bench/README.md');
  }
  const wrong = report.results.filter((r) => hasErrors(r.correctness)).map((r) => r.id);
  if (wrong.length > 0) log(`correctness counts are NOT zero in: ${wrong.join(', ')}`);
  // A scenario that measured its baselines but never Holdline (it did not start, every round failed) is no pass.
  const noHoldline = report.results.filter((r) => r.figures.length > 0 && !r.figures.some((f) => f.values.holdline)).map((r) => r.id);
  if (noHoldline.length > 0) log(`Holdline was NOT measured in: ${noHoldline.join(', ')}`);
  log(`total ${report.durationSeconds.toFixed(1)} s`);
  return wrong.length > 0 || noHoldline.length > 0 || report.failures.length > 0 ? 1 : 0;
}

process.on('exit', () => killTracked());
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.once(signal, () => {
    log(`${signal}: stopping every process the bench started`);
    killTracked();
    process.exit(signal === 'SIGINT' ? 130 : 143);
  });
}

main().then(
  (code) => {
    killTracked();
    process.exit(code);
  },
  (error: unknown) => {
    process.stderr.write(`${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
    killTracked();
    process.exit(1);
  },
);
