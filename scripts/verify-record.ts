/**
 * Checks a job's exported log (events.jsonl) without the server or its database:
 *
 *   npm run verify-record -- <events.jsonl> [--expect <hash>]
 *
 * It recomputes every event's hash with the same shared code the server uses and prints the final
 * hash, or the first event (by seq) where the chain breaks. With `--expect`, a hash kept outside
 * the database (printed on a record, sent in an e-mail), it also says whether the log still leads
 * to it: a log rewritten after that hash was taken, with every later hash recomputed, checks as
 * consistent on its own but no longer leads there.
 *
 * Exit codes: 0 the chain is intact (and, with --expect, leads to the hash); 1 the chain is broken,
 * or it does not lead to the expected hash; 2 the command was used wrongly or the file cannot be read.
 */
import { createReadStream } from 'node:fs';
import { createInterface } from 'node:readline';
import { ChainWalker, chainedEventSchema, hashSchema, type ChainCheck, type ChainProblem } from '../shared/events/chain.js';

const EXIT_INTACT = 0;
const EXIT_BROKEN = 1;
const EXIT_USAGE = 2;

const usage = 'Usage: npm run verify-record -- <events.jsonl> [--expect <64-character hash>]';

const problemWords: Record<ChainProblem, string> = {
  sequence: 'an event is missing, repeated or out of order here',
  link: 'this event does not point at the hash of the event before it',
  content: 'this event’s content no longer gives its hash: it was changed',
  redacted: 'this copy has blind-check values taken out here, so its hash cannot be recomputed; check the whole log a job supervisor downloads',
  head: 'the log ends before the job’s last event',
};

function parseArgs(argv: readonly string[]): { file: string; expect: string | null } | string {
  let file: string | null = null;
  let expect: string | null = null;
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === '--expect') {
      const value = argv[++i];
      if (value === undefined) return '--expect needs a hash.';
      const hash = hashSchema.safeParse(value.trim().toLowerCase());
      if (!hash.success) return `--expect ${value}: a hash is 64 characters 0-9 and a-f.`;
      expect = hash.data;
    } else if (arg.startsWith('--')) return `Unknown option ${arg}.`;
    else if (file === null) file = arg;
    else return `One file at a time (also got ${arg}).`;
  }
  return file === null ? 'Name the events.jsonl file to check.' : { file, expect };
}

/** Reads the file a line at a time into the shared chain check. */
async function checkFile(file: string, expect: string | null): Promise<{ check: ChainCheck; unreadableLine: number | null }> {
  const walker = new ChainWalker(expect);
  const lines = createInterface({ input: createReadStream(file, { encoding: 'utf8' }), crlfDelay: Infinity });
  let lineNo = 0;
  for await (const line of lines) {
    lineNo += 1;
    if (line.trim() === '') continue;
    let parsed: unknown;
    try {
      parsed = JSON.parse(line);
    } catch {
      return { check: walker.result(), unreadableLine: lineNo };
    }
    const event = chainedEventSchema.safeParse(parsed);
    if (!event.success) return { check: walker.result(), unreadableLine: lineNo };
    if (!walker.push(event.data)) break;
  }
  return { check: walker.result(), unreadableLine: null };
}

async function main(argv: readonly string[], print: (line: string) => void = console.log): Promise<number> {
  const args = parseArgs(argv);
  if (typeof args === 'string') {
    print(args);
    print(usage);
    return EXIT_USAGE;
  }
  let result: Awaited<ReturnType<typeof checkFile>>;
  try {
    result = await checkFile(args.file, args.expect);
  } catch (error) {
    print(`Cannot read ${args.file}: ${error instanceof Error ? error.message : String(error)}`);
    return EXIT_USAGE;
  }
  const { check, unreadableLine } = result;
  let intact = check.valid && unreadableLine === null;
  if (unreadableLine !== null) {
    print(`BROKEN: line ${unreadableLine} is not an event of a Holdline log (after ${check.checked} events that check).`);
  } else if (check.valid) {
    print(`Intact: ${check.checked} events checked, the chain is unbroken.`);
    print(`Final hash: ${check.finalHash}`);
  } else {
    print(`BROKEN at event ${check.firstBadSeq}: ${check.problem ? problemWords[check.problem] : 'the chain does not check'}.`);
    print(`${check.checked} events before it check.`);
  }
  if (check.expected) {
    if (check.expected.found) print(`The log leads to ${check.expected.hash}: it is the hash of event ${check.expected.seq}.`);
    else {
      print(`The log does NOT lead to ${check.expected.hash}: no event that checks has this hash. If the hash was taken from this job's record, the log was changed after it was taken.`);
      intact = false;
    }
  }
  return intact ? EXIT_INTACT : EXIT_BROKEN;
}

process.exitCode = await main(process.argv.slice(2));
