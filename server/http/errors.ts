/**
 * Errors of the HTTP API, all one JSON shape: `{ error, field, value, allowed }` (and `issues` when a
 * scenario has several), with the status that says what kind of problem it is. `ApiError` is what
 * routes throw; `errorMiddleware` is the one place that turns anything thrown into a response, so
 * no request can crash the server or leak a stack.
 */
import type { ErrorRequestHandler } from 'express';
import type { Logger } from 'pino';
import { formatValue, type ScenarioIssue } from '../../scenarios/format/schema.ts';
import { RunRefusedError } from '../jobs/admission.ts';
import { NotFoundError, StaleRevisionError } from '../storage/scenarioStore.ts';

/** One problem, as the API reports it. */
export interface ApiErrorBody {
  /** what is wrong, in a sentence */
  error: string;
  /** the field (JSON path, header, query or path parameter) at fault; null when none is */
  field: string | null;
  /** the value found there (shortened when long) */
  value?: unknown;
  /** what is allowed there */
  allowed?: string;
  /** every problem, when a scenario has several */
  issues?: { field: string; value?: unknown; allowed: string }[];
}

export class ApiError extends Error {
  override name = 'ApiError';
  constructor(
    readonly status: number,
    readonly body: ApiErrorBody,
  ) {
    super(body.error);
  }
}

/** Longest value echoed back in an error [characters of JSON]. */
const ECHOED_VALUE_MAX_CHARS = 120;

/** A value safe to echo: small JSON values as they are, anything larger as a shortened text. */
export function echoValue(value: unknown): unknown {
  if (value === undefined) return undefined;
  if (typeof value === 'number' && !Number.isFinite(value)) return String(value);
  let text: string | undefined;
  try {
    text = JSON.stringify(value);
  } catch {
    return formatValue(value);
  }
  if (text === undefined) return String(value);
  return text.length <= ECHOED_VALUE_MAX_CHARS ? value : formatValue(value);
}

/** 400 naming a field of the request. */
export function badRequest(field: string, value: unknown, allowed: string, error?: string): ApiError {
  return new ApiError(400, {
    error: error ?? `${field}: got ${formatValue(value)}; allowed: ${allowed}`,
    field,
    value: echoValue(value),
    allowed,
  });
}

/** 422 for a scenario that does not pass the format (or cannot run), every issue listed. */
export function scenarioIssuesError(issues: readonly ScenarioIssue[], prefix = 'scenario'): ApiError {
  const listed = issues.map((issue) => ({
    field: issue.path === '(scenario)' ? prefix : `${prefix}.${issue.path}`,
    value: echoValue(issue.value),
    allowed: issue.message,
  }));
  const [first] = listed;
  const count = listed.length;
  return new ApiError(422, {
    error: `the scenario is not valid (${count} ${count === 1 ? 'issue' : 'issues'}); first: ${first.field}: got ${formatValue(issues[0].value)}; ${first.allowed}`,
    field: first.field,
    value: first.value,
    allowed: first.allowed,
    issues: listed,
  });
}

/** The response for anything a route threw. */
export function errorMiddleware(logger: Logger): ErrorRequestHandler {
  return (error: unknown, request, response, next) => {
    if (response.headersSent) {
      next(error);
      return;
    }
    const { status, body } = toApiError(error);
    if (status >= 500) logger.error({ err: error, method: request.method, path: request.path }, 'request failed');
    response.status(status).json(body);
  };
}

/** Map thrown errors (our own, body-parser's) to a status and body. */
export function toApiError(error: unknown): { status: number; body: ApiErrorBody } {
  if (error instanceof ApiError) return { status: error.status, body: error.body };
  if (error instanceof NotFoundError) {
    return { status: 404, body: { error: error.message, field: error.field, value: echoValue(error.value) } };
  }
  if (error instanceof StaleRevisionError) {
    return {
      status: 409,
      body: { error: error.message, field: 'revision', value: error.given, allowed: `the latest revision, ${error.latest}` },
    };
  }
  if (error instanceof RunRefusedError) return { status: error.status, body: error.detail };
  const parserError = error as { type?: string; status?: number; message?: string; limit?: number; length?: number };
  switch (parserError.type) {
    case 'entity.parse.failed':
      return {
        status: 400,
        body: { error: `the request body is not valid JSON: ${parserError.message ?? ''}`, field: '(body)', allowed: 'a JSON document (RFC 8259; no NaN, Infinity or comments)' },
      };
    case 'entity.too.large':
      return {
        status: 413,
        body: {
          error: `the request body is ${parserError.length ?? 'more than'} bytes; at most ${parserError.limit} bytes are accepted`,
          field: '(body)',
          value: parserError.length,
          allowed: `at most ${parserError.limit} bytes`,
        },
      };
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return { status: 415, body: { error: parserError.message ?? 'unsupported encoding', field: 'Content-Type', allowed: 'application/json; charset=utf-8' } };
    case 'request.aborted':
      return { status: 400, body: { error: 'the request was aborted while its body was read', field: '(body)' } };
  }
  if (typeof parserError.status === 'number' && parserError.status >= 400 && parserError.status < 500) {
    return { status: parserError.status, body: { error: parserError.message ?? 'bad request', field: '(body)' } };
  }
  return { status: 500, body: { error: 'internal failure; the server logged it and is still serving', field: null } };
}
