import { pino } from 'pino'

// Never log request bodies or headers: they carry passwords, cookies and API keys.
export const logger = pino({
  level: process.env.LOG_LEVEL ?? (process.env.VITEST ? 'silent' : 'info'),
  redact: ['req.headers.authorization', 'req.headers.cookie', 'password', 'key', '*.password', '*.key'],
})
