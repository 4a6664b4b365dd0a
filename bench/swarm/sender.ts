/**
 * The swarm's command sender: `node --import tsx bench/swarm/sender.ts`, forked by
 * bench/lib/swarm.ts and driven over IPC (bench/swarm/protocol.ts). One Socket.IO client, as the
 * board sends commands (`board:command` with an acknowledgment), at a fixed rate that does not
 * wait for answers: a server that falls behind shows it in its acknowledgments, not in the rate.
 */
import { io, type Socket } from 'socket.io-client';
import type { CommandPayload } from '../lib/types.js';
import { now, type Reply, type RunResult, type SenderRequest, type SentCommand } from './protocol.js';

type CommandAck = { ok: true; seq: number; event: unknown } | { ok: false; error: { code: string; message: string } };

interface EmitEvents {
  'board:command': (payload: CommandPayload, ack: (answer: CommandAck) => void) => void;
}

let socket: Socket<Record<string, never>, EmitEvents> | null = null;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function attach(url: string, token: string): Promise<void> {
  socket?.disconnect();
  const s: Socket<Record<string, never>, EmitEvents> = io(url, {
    transports: ['websocket'],
    auth: { token },
    forceNew: true,
    reconnection: true,
    reconnectionDelay: 500,
    reconnectionDelayMax: 3_000,
    timeout: 5_000,
  });
  socket = s;
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error('the sender did not connect in 20 s')), 20_000);
    s.once('connect', () => {
      clearTimeout(timer);
      resolve();
    });
  });
}

async function run(commands: CommandPayload[], ratePerSecond: number, ackTimeoutMs: number): Promise<RunResult> {
  const s = socket;
  if (!s) throw new Error('the sender is not attached');
  // A restarted server: the socket reconnects by itself; commands are not sent into a dead connection.
  for (let waited = 0; !s.connected && waited < 20_000; waited += 20) await sleep(20);
  const interval = 1000 / ratePerSecond;
  const sent: SentCommand[] = [];
  const answers: Promise<void>[] = [];
  const start = now() + 2;
  for (let i = 0; i < commands.length; i++) {
    const wait = start + i * interval - now();
    if (wait >= 1) await sleep(wait);
    const record: SentCommand = { sentAt: now(), ackAt: Number.NaN, ok: false, seq: Number.NaN, code: '', eventBytes: 0 };
    sent.push(record);
    answers.push(
      new Promise<void>((resolve) => {
        s.timeout(ackTimeoutMs).emit('board:command', commands[i], (error: Error | null, answer?: CommandAck) => {
          record.ackAt = error ? Number.NaN : now();
          if (error || !answer) record.code = 'timeout';
          else if (answer.ok) {
            record.ok = true;
            record.seq = answer.seq;
            record.eventBytes = Buffer.byteLength(JSON.stringify(answer.event));
          } else record.code = answer.error.code;
          resolve();
        });
      }),
    );
  }
  await Promise.all(answers);
  return { sent };
}

async function handle(request: SenderRequest): Promise<unknown> {
  switch (request.op) {
    case 'attach':
      await attach(request.url, request.token);
      return null;
    case 'run':
      return run(request.commands, request.ratePerSecond, request.ackTimeoutMs);
    case 'close':
      socket?.disconnect();
      socket = null;
      setTimeout(() => process.exit(0), 50);
      return null;
  }
}

process.on('message', (message: { id: number; request: SenderRequest }) => {
  handle(message.request).then(
    (result) => process.send?.({ id: message.id, ok: true, result } satisfies Reply),
    (error: unknown) => process.send?.({ id: message.id, ok: false, error: error instanceof Error ? (error.stack ?? error.message) : String(error) } satisfies Reply),
  );
});
process.on('disconnect', () => process.exit(0));
