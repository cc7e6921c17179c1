/**
 * An uploaded hourly weather CSV, read with the scenario format's own reader
 * (scenarios/format/weatherCsv.ts), and the preview of what was read. Pure: no DOM.
 */
import { parseWeatherCsv } from '../../scenarios/format/weatherCsv.ts';
import { escapeHtml } from '../map/escapeHtml.ts';

type Obj = Record<string, unknown>;

/**
 * An uploaded hourly CSV, read: the hours and the preview of what was read, or the first problems
 * (each naming the line and column) for the error slot beside the upload.
 */
export function readWeatherUpload(text: string, fileName: string): { ok: true; hours: Obj[]; summaryHtml: string } | { ok: false; errorText: string } {
  const outcome = parseWeatherCsv(text, fileName);
  if (!outcome.ok) {
    const shown = outcome.issues.slice(0, 5).map((i) => `${i.path}: ${i.message}`);
    return { ok: false, errorText: shown.join('\n') + (outcome.issues.length > 5 ? `\n… and ${outcome.issues.length - 5} more` : '') };
  }
  const hours = outcome.hours as unknown as Obj[];
  return { ok: true, hours, summaryHtml: `<p>Read ${hours.length} hours from <b>${escapeHtml(fileName)}</b>.</p>` + hoursSummary(hours) };
}

/** The preview of hours read: their number, first and last time, and the first four rows. */
export function hoursSummary(hours: Obj[]): string {
  if (hours.length === 0) return '<p class="muted">No hours yet.</p>';
  const rows = hours.slice(0, 4);
  return (
    `<p>${hours.length} hours, ${escapeHtml(String(hours[0].time))} to ${escapeHtml(String(hours[hours.length - 1].time))}.</p>` +
    '<table class="mini"><caption class="visually-hidden">First hours read</caption><thead><tr><th scope="col">time</th><th scope="col">speed [m/s]</th><th scope="col">from [°]</th><th scope="col">class</th></tr></thead><tbody>' +
    rows.map((h) => `<tr><td>${escapeHtml(String(h.time))}</td><td>${h.windSpeed_m_s}</td><td>${h.windFrom_deg}</td><td>${escapeHtml(String(h.stability ?? '(derived)'))}</td></tr>`).join('') +
    '</tbody></table>'
  );
}
