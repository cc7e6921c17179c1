/**
 * receptors-with-caution.csv: the same rows as receptors.csv, after a block of comment lines (each
 * starting "# ") holding the screening caution, the scenario, the units and the provenance.
 *
 * Why two files: receptors.csv stays machine-clean (RFC 4180 has no comments, and a script or a
 * spreadsheet import that reads it must not trip over one); this one is the file that can travel alone
 * and still carry the caution. Readers that skip comment lines take it as it is: pandas
 * `read_csv(..., comment='#')`, R `read.csv(..., comment.char = '#')`, GDAL's CSV driver does not.
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';
import { SCREENING_CAUTION } from './caution.ts';
import type { RunProvenance } from './provenance.ts';
import { buildReceptorsCsv } from './receptorsCsv.ts';
import { wrapText } from './map/svgText.ts';

const LINE_END = '\r\n';

/**
 * Build receptors-with-caution.csv's text.
 *
 * @param scenario the parsed scenario
 * @param result the run
 * @param provenance version, checksum, run date and command
 * @returns comment lines, then exactly the text of receptors.csv
 */
export function buildReceptorsCautionCsv(scenario: Scenario, result: ScenarioRunResult, provenance: RunProvenance): string {
  // Comment text on one line each: no line breaks inside (a name may hold one), wrapped for reading.
  const flat = (text: string): string => text.replace(/[\r\n]+/g, ' ');
  const comments = [
    ...wrapText(`CAUTION: ${SCREENING_CAUTION}`, 100 * 0.58 * 10, 10),
    `Scenario: ${flat(scenario.name)}`,
    `Pollutant: ${flat(scenario.pollutant.name)}; concentrations in ug/m3 at each receptor's height_m; positions WGS 84 lat/lon and local metres (x east, y north of the site)`,
    `Weather: ${result.weatherKind}; mode: ${result.mode}`,
    `plumeplan ${provenance.version}; scenario SHA-256 ${provenance.scenarioSha256}; run ${provenance.runDate}`,
    `Command: ${flat(provenance.command)}`,
  ];
  return comments.map((line) => `# ${line}${LINE_END}`).join('') + buildReceptorsCsv(scenario, result);
}
