/**
 * A run's files as download links, named for people: the core results, the consultation pack (report,
 * GeoTIFF, map, zip) when the run made one, and the files of sweeps, stack-height searches, comparisons
 * and siting. Pure: no DOM.
 */
import { escapeHtml } from '../map/escapeHtml.ts';

/** Labels of the result files the server offers (docs/http-api.md, "Result files"). */
export const FILE_LABELS: Record<string, string> = {
  'summary.json': 'Summary (JSON)',
  'receptors.csv': 'Receptor figures (CSV)',
  'footprint.geojson': 'Footprint isopleths (GeoJSON)',
  'windrose.svg': 'Wind rose (SVG)',
  'ground-field.bin': 'Ground field (binary float32)',
  'report.pdf': 'Report (PDF, A4)',
  'report.html': 'Report (web page, prints on A4)',
  'ground.tif': 'Ground field (GeoTIFF)',
  'map.png': 'Site map (PNG)',
  'map.svg': 'Site map (SVG)',
  'receptors-with-caution.csv': 'Receptor figures with the caution (CSV)',
  'plumeplan-run.zip': 'Everything above (zip)',
  'sweep.csv': 'Sweep table (CSV)',
  'sweep.svg': 'Sweep chart (SVG)',
  'sweep.json': 'Sweep figures (JSON)',
  'stack-height.csv': 'Height curve (CSV)',
  'stack-height.svg': 'Height chart (SVG)',
  'stack-height.json': 'Stack height answer (JSON)',
  'comparison.json': 'Comparison figures (JSON)',
  'difference.geojson': 'Difference bands, B - A (GeoJSON)',
  'siting.json': 'Siting answer (JSON)',
  'candidates.csv': 'Candidate positions ranked (CSV)',
  'siting-map.tif': 'Siting map (GeoTIFF)',
  'siting.geojson': 'Siting map bands (GeoJSON)',
  'siting-map.svg': 'Siting map figure (SVG)',
  'siting-map.png': 'Siting map figure (PNG)',
  'siting-report.html': 'Siting report (web page, prints on A4)',
  'siting-report.pdf': 'Siting report (PDF, A4)',
  'difference-map.svg': 'Difference map, B - A (SVG)',
  'difference-map.png': 'Difference map, B - A (PNG)',
  'comparison-report.html': 'Comparison report (web page, prints on A4)',
  'comparison-report.pdf': 'Comparison report (PDF, A4)',
};

/** The consultation pack's files, listed first when a run has them. */
const PACK_FIRST = [
  'report.pdf',
  'comparison-report.pdf',
  'siting-report.pdf',
  'ground.tif',
  'map.png',
  'difference-map.png',
  'siting-map.png',
  'plumeplan-run.zip',
  'report.html',
  'comparison-report.html',
  'siting-report.html',
  'map.svg',
  'receptors-with-caution.csv',
];

export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} kB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}

/** A file's name for people; a comparison's side files (a.NAME, b.NAME) are named by their side. */
export function fileLabel(name: string): string {
  const side = /^([ab])\.(.+)$/.exec(name);
  if (side) return `${side[1].toUpperCase()}: ${FILE_LABELS[side[2]] ?? side[2]}`;
  return FILE_LABELS[name] ?? name;
}

/** The run's files as a list of links, the pack's first. */
export function downloadsHtml(run: { results: readonly { name: string; bytes: number; url: string }[] }): string {
  const rank = (name: string) => {
    const n = PACK_FIRST.indexOf(name);
    return n < 0 ? PACK_FIRST.length : n;
  };
  const files = [...run.results].sort((a, b) => rank(a.name) - rank(b.name));
  const pack = files.some((file) => PACK_FIRST.includes(file.name));
  return (
    '<ul class="files">' +
    files
      .map((file) => `<li><a href="${escapeHtml(file.url)}" download="${escapeHtml(file.name)}" data-testid="download-${escapeHtml(file.name)}">${escapeHtml(fileLabel(file.name))}</a> <span class="muted">${formatBytes(file.bytes)}</span></li>`)
      .join('') +
    '</ul><p class="hint">Each file carries the screening caution' +
    (files.some((file) => file.name.endsWith('.csv')) ? ' (a plain CSV travels with the JSON beside it)' : '') +
    '.' +
    (pack || !files.some((file) => file.name === 'summary.json') ? '' : ' The consultation pack (report PDF, GeoTIFF, map PNG, zip) comes with a run that asks for it.') +
    '</p>'
  );
}
