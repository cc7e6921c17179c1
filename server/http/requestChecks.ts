/**
 * Checks every request passes before a route sees it: ids in paths, JSON content type, the nesting
 * depth of a JSON body, and the optional access token.
 */
import { timingSafeEqual } from 'node:crypto';
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { isId } from '../storage/ids.ts';
import { ApiError, badRequest } from './errors.ts';

/** Deepest nesting of arrays and objects a JSON body may have (a scenario needs about 6). */
export const MAX_JSON_DEPTH = 32;

/** The `:id` path parameter, checked (no path traversal or odd characters reach storage). */
export function scenarioIdParam(request: Request): string {
  return idParam(request, 'id');
}

export function idParam(request: Request, name: string): string {
  const value = request.params[name];
  if (!isId(value)) throw badRequest(name, value, 'an id the server made (a lower-case version-4 UUID)');
  return value;
}

/** Refuse a body that is not JSON (415), before the route reads it. */
export const requireJson: RequestHandler = (request, _response, next) => {
  if (!request.is('application/json')) {
    throw new ApiError(415, {
      error: `Content-Type: got ${JSON.stringify(request.get('Content-Type') ?? null)}; send the body as application/json`,
      field: 'Content-Type',
      value: request.get('Content-Type') ?? null,
      allowed: 'application/json',
    });
  }
  next();
};

/** Refuse JSON nested deeper than MAX_JSON_DEPTH (400), walking without recursion. */
export const limitJsonDepth: RequestHandler = (request, _response, next) => {
  const body: unknown = request.body;
  if (body === null || typeof body !== 'object') {
    next();
    return;
  }
  const stack: [unknown, number][] = [[body, 1]];
  while (stack.length > 0) {
    const [value, depth] = stack.pop() as [unknown, number];
    if (depth > MAX_JSON_DEPTH) {
      throw badRequest('(body)', `nesting deeper than ${MAX_JSON_DEPTH}`, `JSON nested at most ${MAX_JSON_DEPTH} levels deep`);
    }
    for (const inner of Object.values(value as object)) {
      if (inner !== null && typeof inner === 'object') stack.push([inner, depth + 1]);
    }
  }
  next();
};

/**
 * When the server has a token (it is bound beyond this machine), every /api request must carry
 * `Authorization: Bearer TOKEN` (the progress stream, GET .../events, may give it as ?access_token=TOKEN).
 */
export function requireToken(token: string): RequestHandler {
  const expected = Buffer.from(token, 'utf8');
  return (request: Request, _response: Response, next: NextFunction) => {
    const header = request.get('Authorization') ?? '';
    const match = /^Bearer (.+)$/.exec(header);
    // A browser's EventSource cannot send headers: the progress stream also takes ?access_token=.
    const queryToken = request.method === 'GET' && request.path.endsWith('/events') ? request.query.access_token : undefined;
    const given = Buffer.from(match?.[1] ?? (typeof queryToken === 'string' ? queryToken : ''), 'utf8');
    if (given.length !== expected.length || !timingSafeEqual(given, expected)) {
      throw new ApiError(401, {
        error: 'Authorization: this server needs its access token: send Authorization: Bearer TOKEN',
        field: 'Authorization',
        allowed: 'Bearer and the token the server was started with (PLUMEPLAN_TOKEN)',
      });
    }
    next();
  };
}
