/**
 * Ids of scenarios and runs: random UUIDs (version 4), lower case. Every id that arrives in a URL is
 * checked against `ID_PATTERN` before it reaches the database or a file path, so no request can name
 * a path outside the data folder.
 */
import { createHash, randomUUID } from 'node:crypto';

/** A version-4 UUID in lower case, e.g. 3f2b8c1e-6a4d-4e1f-9b2a-0c7d5e8f1a2b. */
export const ID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/;

/** A new id for a scenario or a run. */
export function newId(): string {
  return randomUUID();
}

/** Whether `text` is an id this server could have made. */
export function isId(text: unknown): text is string {
  return typeof text === 'string' && ID_PATTERN.test(text);
}

/**
 * JSON text with object keys sorted at every level, so two equal values give the same text whatever
 * the order their keys were written in.
 */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(value, (_key, inner: unknown) => {
    if (inner === null || typeof inner !== 'object' || Array.isArray(inner)) return inner;
    const sorted: Record<string, unknown> = {};
    for (const key of Object.keys(inner as object).sort()) sorted[key] = (inner as Record<string, unknown>)[key];
    return sorted;
  });
}

/** SHA-256 of a text or bytes, as lower-case hex. */
export function sha256Hex(content: string | Uint8Array): string {
  return createHash('sha256').update(content).digest('hex');
}
