/** One line per request: method, path, status, milliseconds. */
import type { RequestHandler } from 'express';

export function requestLog(log: (line: string) => void = (line) => console.info(line)): RequestHandler {
  return (req, res, next) => {
    const started = process.hrtime.bigint();
    res.on('finish', () => {
      const ms = Number(process.hrtime.bigint() - started) / 1e6;
      log(`${req.method} ${req.originalUrl.split('?')[0]} ${res.statusCode} ${ms.toFixed(1)}ms`);
    });
    next();
  };
}
