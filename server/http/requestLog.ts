/**
 * One structured log line per request (pino): method, path (without the query), status, bytes and
 * milliseconds. Never bodies: a scenario's contents stay out of the logs.
 */
import type { RequestHandler } from 'express';
import type { Logger } from 'pino';

export function requestLog(logger: Logger): RequestHandler {
  return (request, response, next) => {
    const started = process.hrtime.bigint();
    response.on('finish', () => {
      const elapsed_ms = Number(process.hrtime.bigint() - started) / 1e6;
      logger.info(
        {
          method: request.method,
          path: request.originalUrl.split('?')[0],
          status: response.statusCode,
          bytes: Number(response.get('Content-Length') ?? 0),
          ms: Math.round(elapsed_ms * 10) / 10,
        },
        'request',
      );
    });
    next();
  };
}
