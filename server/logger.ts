import { pino } from 'pino';

export function createLogger(env: string) {
  return pino({
    level: process.env.LOG_LEVEL ?? (env === 'test' ? 'silent' : 'info'),
    // Session cookies and API tokens never reach the logs.
    redact: ['req.headers.cookie', 'req.headers.authorization', 'res.headers["set-cookie"]'],
  });
}
