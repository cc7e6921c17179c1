/**
 * `npm start`: the plumeplan server. Opens the data folder (`PLUMEPLAN_DATA`, default ./data), loads
 * the demo scenarios into an empty database, listens on `HOST`:`PORT` (default 127.0.0.1:8765) and
 * prints its URL. SIGTERM or SIGINT shuts it down gracefully: no new connections, running runs
 * stopped and marked interrupted, responses under way finished, the database closed.
 *
 * `PLUMEPLAN_DEMOS=off` leaves an empty database empty.
 *
 * Bound to anything but loopback it prints a warning, and with `PLUMEPLAN_TOKEN` set every /api
 * request must carry `Authorization: Bearer TOKEN`.
 */
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { pino } from 'pino';
import { createApp } from './http/app.ts';
import { loadDemoScenarios, openServices } from './services.ts';

export const DEFAULT_HOST = '127.0.0.1';
export const DEFAULT_PORT = 8765;

/** Longest wait for responses under way at shutdown [ms]; then connections are closed. */
const SHUTDOWN_GRACE_ms = 5000;

const LOOPBACK_HOSTS = new Set(['127.0.0.1', '::1', 'localhost']);

export function isLoopback(host: string): boolean {
  return LOOPBACK_HOSTS.has(host) || /^127\./.test(host);
}

async function start(): Promise<void> {
  const env = process.env;
  const host = env.HOST ?? DEFAULT_HOST;
  const port = env.PORT === undefined ? DEFAULT_PORT : Number(env.PORT);
  if (!Number.isInteger(port) || port < 0 || port > 65535) {
    process.stderr.write(`plumeplan server: PORT: got ${JSON.stringify(env.PORT)}; allowed: an integer 0 to 65535\n`);
    process.exitCode = 2;
    return;
  }
  const dataDir = path.resolve(env.PLUMEPLAN_DATA ?? 'data');
  const token = env.PLUMEPLAN_TOKEN === undefined || env.PLUMEPLAN_TOKEN === '' ? undefined : env.PLUMEPLAN_TOKEN;
  const logger = pino({ level: env.PLUMEPLAN_LOG_LEVEL ?? 'info', base: { service: 'plumeplan' } });

  // A promise nobody awaited must not take the server down: log it and keep serving.
  process.on('unhandledRejection', (reason) => logger.error({ err: reason }, 'unhandled rejection'));

  const services = await openServices({ dataDir, logger });
  if (services.interruptedAtStart.length > 0) {
    logger.warn({ runs: services.interruptedAtStart.length }, 'runs a restart had stopped were marked interrupted');
  }
  const loaded = env.PLUMEPLAN_DEMOS === 'off' ? [] : await loadDemoScenarios(services.scenarios);
  if (loaded.length > 0) logger.info({ scenarios: loaded.length }, 'demo scenarios loaded into the empty database');

  const app = createApp({ ...services, token });
  const server = app.listen(port, host);
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', reject);
  });
  const address = server.address() as AddressInfo;
  const shownHost = address.family === 'IPv6' ? `[${address.address}]` : address.address;
  process.stdout.write(`plumeplan server: http://${shownHost}:${address.port}/ (data in ${dataDir})\n`);
  if (!isLoopback(host)) {
    process.stderr.write(
      `plumeplan server: WARNING: bound to ${host}, reachable from other machines. ` +
        (token === undefined
          ? 'Anyone who can reach it can read and change every scenario: set PLUMEPLAN_TOKEN to require a token.\n'
          : 'Every /api request must carry Authorization: Bearer PLUMEPLAN_TOKEN.\n'),
    );
  }

  let stopping = false;
  const stop = async (signal: string): Promise<void> => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'shutting down');
    const closed = new Promise<void>((resolve) => server.close(() => resolve()));
    server.closeIdleConnections();
    // Stopping the runs ends their progress streams (each hears "interrupted").
    await services.manager.shutdown();
    const grace = setTimeout(() => server.closeAllConnections(), SHUTDOWN_GRACE_ms);
    await closed;
    clearTimeout(grace);
    await services.close();
    logger.info('stopped');
    process.exit(0);
  };
  process.once('SIGTERM', () => void stop('SIGTERM'));
  process.once('SIGINT', () => void stop('SIGINT'));
}

await start();
