/**
 * The page's client of the server's JSON API (docs/http-api.md): scenarios with revisions, runs with
 * progress as server-sent events, cancellation and result files. Every error the server sends is JSON
 * `{error, field, value, allowed}`; the client raises it as an ApiError carrying those fields so the
 * page can show it beside the field it names.
 */

export interface ScenarioRecord {
  id: string;
  revision: number;
  name: string;
  createdAt: string;
  updatedAt: string;
  deletedAt: string | null;
}

export interface ScenarioWithContent extends ScenarioRecord {
  checksum: string;
  scenario: Record<string, unknown>;
}

export interface RevisionRecord {
  revision: number;
  name: string;
  checksum: string;
  createdAt: string;
}

export type RunStatus = 'queued' | 'running' | 'done' | 'failed' | 'cancelled' | 'interrupted';

export const FINAL_RUN_STATUSES: readonly RunStatus[] = ['done', 'failed', 'cancelled', 'interrupted'];

export interface ResultFile {
  name: string;
  contentType: string;
  bytes: number;
  sha256: string;
  url: string;
}

export interface ApiErrorBody {
  error: string;
  field: string | null;
  value?: unknown;
  allowed?: string;
  issues?: { field: string; value?: unknown; allowed: string }[];
}

export interface RunRecord {
  id: string;
  scenarioId: string;
  revision: number;
  kind: string;
  mode: 'grid' | 'gaussian';
  status: RunStatus;
  progress: number;
  message: string;
  error: ApiErrorBody | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  results: ResultFile[];
}

export interface RunUpdate {
  id: string;
  status: RunStatus;
  progress: number;
  message: string;
  error: ApiErrorBody | null;
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

export class ApiClient {
  constructor(private readonly base = '') {}

  private async request<T>(method: string, path: string, body?: unknown, headers: Record<string, string> = {}): Promise<T> {
    const response = await fetch(`${this.base}${path}`, {
      method,
      headers: body === undefined ? headers : { 'Content-Type': 'application/json', ...headers },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const text = await response.text();
    let json: unknown = null;
    try {
      json = text === '' ? null : JSON.parse(text);
    } catch {
      json = null;
    }
    if (!response.ok) {
      const fallback: ApiErrorBody = { error: `${method} ${path}: HTTP ${response.status}`, field: null };
      throw new ApiError(response.status, json && typeof json === 'object' && 'error' in json ? (json as ApiErrorBody) : fallback);
    }
    return json as T;
  }

  listScenarios(limit = 100, offset = 0): Promise<{ items: ScenarioRecord[]; total: number }> {
    return this.request('GET', `/api/scenarios?limit=${limit}&offset=${offset}`);
  }

  getScenario(id: string): Promise<ScenarioWithContent> {
    return this.request('GET', `/api/scenarios/${encodeURIComponent(id)}`);
  }

  getRevision(id: string, revision: number): Promise<ScenarioWithContent> {
    return this.request('GET', `/api/scenarios/${encodeURIComponent(id)}/revisions/${revision}`);
  }

  listRevisions(id: string): Promise<{ id: string; items: RevisionRecord[] }> {
    return this.request('GET', `/api/scenarios/${encodeURIComponent(id)}/revisions`);
  }

  createScenario(scenario: unknown): Promise<ScenarioRecord> {
    return this.request('POST', '/api/scenarios', { scenario });
  }

  /** Save a new revision; `revision` is the one the edit started from (a stale one gets 409). */
  updateScenario(id: string, scenario: unknown, revision: number): Promise<ScenarioRecord> {
    return this.request('PUT', `/api/scenarios/${encodeURIComponent(id)}`, { scenario, revision });
  }

  deleteScenario(id: string): Promise<ScenarioRecord> {
    return this.request('DELETE', `/api/scenarios/${encodeURIComponent(id)}`);
  }

  startRun(scenarioId: string, revision: number, mode?: 'grid' | 'gaussian', pack?: 'none' | 'quick' | 'full'): Promise<{ id: string; status: RunStatus; reused: boolean; url: string }> {
    const body: Record<string, unknown> = { scenarioId, revision };
    if (mode !== undefined) body.mode = mode;
    if (pack !== undefined && pack !== 'none') body.pack = pack;
    return this.request('POST', '/api/runs', body);
  }

  /** A run of another kind: `sweep`, `stack-height`, `compare` or `site` (docs/http-api.md). */
  startStudy(body: Record<string, unknown>): Promise<{ id: string; status: RunStatus; reused: boolean; url: string }> {
    return this.request('POST', '/api/runs', body);
  }

  getRun(id: string): Promise<RunRecord> {
    return this.request('GET', `/api/runs/${encodeURIComponent(id)}`);
  }

  listRuns(): Promise<{ items: RunRecord[] }> {
    return this.request('GET', '/api/runs');
  }

  cancelRun(id: string): Promise<RunRecord> {
    return this.request('POST', `/api/runs/${encodeURIComponent(id)}/cancel`);
  }

  /**
   * Follow a run's progress by server-sent events until it ends.
   *
   * @param onUpdate called with every status and progress event
   * @returns a function that stops listening
   */
  followRun(id: string, onUpdate: (update: RunUpdate) => void): () => void {
    const source = new EventSource(`${this.base}/api/runs/${encodeURIComponent(id)}/events`);
    const handle = (event: MessageEvent<string>) => {
      const update = JSON.parse(event.data) as RunUpdate;
      onUpdate(update);
      if (FINAL_RUN_STATUSES.includes(update.status)) source.close();
    };
    source.addEventListener('status', handle as EventListener);
    source.addEventListener('progress', handle as EventListener);
    return () => source.close();
  }

  /** A finished run's assessment figures: `{ id, revision, assessment, peak, caution }` (docs/http-api.md). */
  getAssessment(id: string): Promise<{ id: string; revision: number; assessment: unknown; peak: unknown; caution: string; verdicts?: unknown }> {
    return this.request('GET', `/api/runs/${encodeURIComponent(id)}/assessment`);
  }

  async resultBytes(file: ResultFile): Promise<ArrayBuffer> {
    const response = await fetch(`${this.base}${file.url}`);
    if (!response.ok) throw new ApiError(response.status, { error: `${file.name}: HTTP ${response.status}`, field: 'name', value: file.name });
    return response.arrayBuffer();
  }

  async resultJson<T>(file: ResultFile): Promise<T> {
    return JSON.parse(new TextDecoder().decode(await this.resultBytes(file))) as T;
  }
}
