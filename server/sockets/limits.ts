import type { AppContext } from '../context.js';
import { refusalOf } from '../errors.js';
import { cleanInput, CommandRate, isStopCommand } from '../middlewares/input-guard.js';
import type { HoldlineSocket } from './auth.js';

/**
 * The socket's edge, before any handler: every message of one socket draws from its own rate
 * bucket (`COMMAND_RATE`), and its payload is cleaned as an HTTP body is (`cleanInput`: lone
 * surrogates to U+FFFD, forbidden keys and deep nesting refused). A refused message is answered
 * in its acknowledgment with the same error shape as HTTP and never reaches its handler; one sent
 * without an acknowledgment is dropped. Oversized messages never get here: Socket.IO closes the
 * transport (`SOCKET_MESSAGE_LIMIT_BYTES`).
 *
 * A stop is never held back by other messages: it is decided by its own small bucket
 * (`STOP_RATE`, burst 3 then one a second), so the first press always gets through however many
 * other messages the socket sent. Every stop taken is a hash-chained event written under the
 * queue the whole crew shares, so a flood of stops is held to a few recorded presses; one refused
 * is answered `too_many_commands`, and the board store keeps it and sends it again.
 */
export function guardSocketInput(context: AppContext, socket: HoldlineSocket): void {
  const rate = new CommandRate(undefined, context.config.commandRate);
  // Said once per connection in the log, so an operator can find a stuck client or a script.
  let warned = false;
  socket.use((packet, next) => {
    const ack: unknown = packet.at(-1);
    const answer = (error: unknown) => {
      if (typeof ack === 'function') ack(refusalOf(error, context.logger, { event: packet[0], userId: socket.data.userId }));
    };
    const refused = rate.take(isStop(packet), 'device');
    if (refused) {
      if (!warned) context.logger.warn({ userId: socket.data.userId, socketId: socket.id, event: packet[0] }, 'socket over its message rate');
      warned = true;
      return answer(refused.error);
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
  return isStopCommand(payload.command);
}
