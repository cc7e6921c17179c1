/**
 * The page's side of the preview worker: ask for a preview whenever the scenario changes; while one is
 * being computed, keep only the newest request and send it when the worker is free. Every answer says
 * how long it took from the request to the answer (the figure the bench reports).
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import type { PreviewOptions, PreviewResult } from './previewField.ts';
import type { PreviewRequest, PreviewResponse } from './preview.worker.ts';

export interface PreviewAnswer {
  result: PreviewResult | null;
  error: string | null;
  /** from the request to the answer's arrival on the page [ms] */
  roundTrip_ms: number;
}

export class PreviewClient {
  private readonly worker: Worker;
  private busy = false;
  private pending: { scenario: Scenario; options: PreviewOptions; requested: number } | null = null;
  private inFlightRequested = 0;
  private nextId = 1;

  constructor(private readonly onAnswer: (answer: PreviewAnswer) => void) {
    this.worker = new Worker(new URL('./preview.worker.ts', import.meta.url), { type: 'module', name: 'preview' });
    this.worker.onmessage = (event: MessageEvent<PreviewResponse>) => this.receive(event.data);
    this.worker.onerror = (event) => {
      this.busy = false;
      this.onAnswer({ result: null, error: `preview worker failed: ${event.message}`, roundTrip_ms: 0 });
    };
  }

  /** Ask for the preview of a (parsed, valid) scenario. */
  request(scenario: Scenario, options: PreviewOptions = {}): void {
    this.pending = { scenario, options, requested: performance.now() };
    if (!this.busy) this.sendPending();
  }

  dispose(): void {
    this.worker.terminate();
  }

  private sendPending(): void {
    if (this.pending === null) return;
    const { scenario, options, requested } = this.pending;
    this.pending = null;
    this.busy = true;
    this.inFlightRequested = requested;
    const message: PreviewRequest = { requestId: this.nextId++, scenario, options };
    this.worker.postMessage(message);
  }

  private receive(response: PreviewResponse): void {
    this.busy = false;
    const roundTrip_ms = performance.now() - this.inFlightRequested;
    if (response.ok) this.onAnswer({ result: response.result, error: null, roundTrip_ms });
    else this.onAnswer({ result: null, error: response.error, roundTrip_ms });
    this.sendPending();
  }
}
