/**
 * The preview's Web Worker: computes Gaussian previews off the page's main thread so that dragging a
 * stack never stutters. One request at a time; the page sends only the newest scenario while one is
 * being computed (previewClient.ts), so the worker never works through a backlog.
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import { computePreview, type PreviewOptions, type PreviewResult } from './previewField.ts';

export interface PreviewRequest {
  requestId: number;
  scenario: Scenario;
  options: PreviewOptions;
}

export type PreviewResponse =
  | { requestId: number; ok: true; result: PreviewResult }
  | { requestId: number; ok: false; error: string };

const scope = self as unknown as {
  onmessage: ((event: MessageEvent<PreviewRequest>) => void) | null;
  postMessage(message: PreviewResponse, transfer?: Transferable[]): void;
};

scope.onmessage = (event) => {
  const { requestId, scenario, options } = event.data;
  try {
    const result = computePreview(scenario, options);
    scope.postMessage({ requestId, ok: true, result }, [result.field_ug_m3.buffer]);
  } catch (error) {
    scope.postMessage({ requestId, ok: false, error: error instanceof Error ? error.message : String(error) });
  }
};
