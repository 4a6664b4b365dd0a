import { pino, type Logger } from 'pino';

/** Structured JSON logs; tests pass level 'silent'. */
export function createLogger(level = 'info'): Logger {
  return pino({ level, base: { app: 'holdline' }, redact: ['req.headers.authorization', 'req.headers.cookie', '*.password', '*.token'] });
}
export type { Logger };
