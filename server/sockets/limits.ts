import type { AppContext } from '../context.js';
import { refusalOf } from '../errors.js';
import { cleanInput, COMMAND_RATE, RateBucket, tooManyCommands } from '../middlewares/input-guard.js';
import type { HoldlineSocket } from './auth.js';

/**
 * The socket's edge, before any handler: every message of one socket draws from its own rate
 * bucket (`COMMAND_RATE`), and its payload is cleaned as an HTTP body is (`cleanInput`: lone
 * surrogates to U+FFFD, forbidden keys and deep nesting refused). A refused message is answered
 * in its acknowledgment with the same error shape as HTTP and never reaches its handler; one sent
 * without an acknowledgment is dropped. Oversized messages never get here: Socket.IO closes the
 * transport (`SOCKET_MESSAGE_LIMIT_BYTES`).
 *
 * A stop is never held back by the rate: it still draws from the bucket, but is let through
 * when the bucket is empty. Refusing the one command that halts the crane would be the unsafe
 * side; a repeated stop is recorded as pressed again and changes nothing else.
 */
export function guardSocketInput(context: AppContext, socket: HoldlineSocket): void {
  const bucket = new RateBucket(COMMAND_RATE.perSecond, COMMAND_RATE.burst);
  // Said once per connection in the log, so an operator can find a stuck client or a script.
  let warned = false;
  socket.use((packet, next) => {
    const ack: unknown = packet.at(-1);
    const answer = (error: unknown) => {
      if (typeof ack === 'function') ack(refusalOf(error, context.logger, { event: packet[0], userId: socket.data.userId }));
    };
    if (!bucket.take() && !isStop(packet)) {
      if (!warned) context.logger.warn({ userId: socket.data.userId, socketId: socket.id, event: packet[0] }, 'socket over its message rate');
      warned = true;
      return answer(tooManyCommands());
    }
    try {
      for (let i = 1; i < packet.length; i++) if (typeof packet[i] !== 'function') packet[i] = cleanInput(packet[i]);
    } catch (error) {
      return answer(error);
    }
    next();
  });
}

/** A board command that stops the job (checked again by the schema; this only decides the rate). */
function isStop(packet: unknown[]): boolean {
  if (packet[0] !== 'board:command') return false;
  const payload = packet[1];
  if (typeof payload !== 'object' || payload === null || !('command' in payload)) return false;
  const { command } = payload;
  return typeof command === 'object' && command !== null && 'type' in command && command.type === 'job.stop';
}
