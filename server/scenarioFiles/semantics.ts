/**
 * The checks of a scenario that need the local grid: the grid's memory estimate (made from the
 * domain's numbers before anything is allocated), sources and receptors inside the domain (area
 * polygons wholly inside), and release heights below the grid top.
 *
 * The grid itself is the solver's (`prepareScenarioGeometry` in solver/grid): this module only
 * calls it and turns its RangeErrors, whose messages start with the field path, into issues. When
 * a source or receptor is refused, the others are placed one by one on the same grid so that every
 * misplaced one is reported, not only the first.
 */
import { checkGridMemory, deriveDomain } from '../../solver/grid/domainDefaults.ts';
import { buildLocalGrid } from '../../solver/grid/localGrid.ts';
import { createLocalProjection } from '../../solver/grid/projection.ts';
import { prepareScenarioGeometry, type ScenarioGeometry } from '../../solver/grid/scenarioGeometry.ts';
import type { LocalGrid, LocalProjection } from '../../solver/grid/types.ts';
import { placeReceptors, placeSources } from '../../solver/sources/placement.ts';
import { formatPath, valueAtPath, type ScenarioIssue } from '../../scenarios/format/schema.ts';
import type { Domain, Scenario } from '../../scenarios/format/types.ts';
import { inputWarnings, type InputWarning } from '../../solver/diagnostics/plausibility.ts';

export interface GeometryExamination {
  /** every issue found; empty when the scenario fits its grid */
  issues: ScenarioIssue[];
  /** the placed geometry when there were no issues, else null */
  geometry: ScenarioGeometry | null;
  /**
   * plausibility warnings (not errors) when there were no issues: the same function a run calls
   * (solver/diagnostics/plausibility.ts), so validate and run agree
   */
  warnings: InputWarning[];
}

/**
 * Checks a parsed scenario against its local grid.
 * @param scenario a scenario that passed `parseScenario` (with `weather.hours` filled)
 * @returns the issues, each naming the field path (`domain`, `sources[2]`, `receptors[0].height_m`...)
 * @example checkScenarioGeometry(scenario) // [] when everything lies inside the domain
 */
export function checkScenarioGeometry(scenario: Scenario): ScenarioIssue[] {
  return examineScenarioGeometry(scenario).issues;
}

/**
 * Like `checkScenarioGeometry`, and also hands back the placed geometry (for `plumeplan validate`
 * to report the grid it would run on).
 */
export function examineScenarioGeometry(scenario: Scenario): GeometryExamination {
  let geometry: ScenarioGeometry;
  try {
    geometry = prepareScenarioGeometry(scenario);
  } catch (error) {
    if (!(error instanceof RangeError)) throw error;
    const first = issueFromRangeError(error, scenario);
    const placementProblem = /^(sources|receptors)\[/.test(first.path);
    const issues = placementProblem ? (collectPlacementIssues(scenario) ?? [first]) : [first];
    return { issues: issues.length > 0 ? issues : [first], geometry: null, warnings: [] };
  }
  const issues = checkReleaseHeights(scenario, geometry.grid);
  if (issues.length > 0) return { issues, geometry: null, warnings: [] };
  let warnings: InputWarning[];
  try {
    warnings = inputWarnings(scenario, geometry);
  } catch (error) {
    // Weather a run could not resolve is an issue there too.
    if (!(error instanceof RangeError)) throw error;
    return { issues: [issueFromRangeError(error, scenario)], geometry: null, warnings: [] };
  }
  return { issues, geometry, warnings };
}

/** The grid top [m]. */
function gridTop_m(grid: LocalGrid): number {
  return grid.zFaces_m[grid.nz];
}

/** A release at or above the grid's lid would put its mass outside the grid. */
function checkReleaseHeights(scenario: Scenario, grid: LocalGrid): ScenarioIssue[] {
  const top_m = gridTop_m(grid);
  const issues: ScenarioIssue[] = [];
  scenario.sources.forEach((source, index) => {
    const field = source.kind === 'point' ? 'height_m' : 'releaseHeight_m';
    const height_m = source.kind === 'point' ? source.height_m : source.releaseHeight_m;
    if (!(height_m < top_m)) {
      issues.push({
        path: `sources[${index}].${field}`,
        value: height_m,
        message:
          `must be below the grid top, ${top_m} m` +
          (scenario.domain ? ' (domain.height_m); raise domain.height_m' : ' (derived); give a domain with a larger height_m'),
      });
    }
  });
  return issues;
}

/**
 * Places every source and receptor on its own against the scenario's grid, so that each one that
 * is refused gives its own issue. Returns null when the grid itself cannot be built (then the
 * first error stands alone).
 */
function collectPlacementIssues(scenario: Scenario): ScenarioIssue[] | null {
  let projection: LocalProjection;
  try {
    projection = createLocalProjection(scenario.site);
  } catch {
    return null;
  }
  const issues: ScenarioIssue[] = [];
  const each = (listName: 'sources' | 'receptors', count: number, check: (index: number) => void): void => {
    for (let index = 0; index < count; index++) {
      try {
        check(index);
      } catch (error) {
        if (!(error instanceof RangeError)) throw error;
        // The item was checked as a list of one: its messages say [0] where the scenario has [index].
        const renumbered = error.message.replace(new RegExp(`^${listName}\\[0\\]`), `${listName}[${index}]`);
        issues.push(issueFromRangeError(new RangeError(renumbered), scenario));
      }
    }
  };

  let domain: Domain;
  if (scenario.domain) domain = scenario.domain;
  else {
    // A derived domain refuses positions too far from the site: find every such one.
    each('sources', scenario.sources.length, (index) => {
      deriveDomain({ sources: [scenario.sources[index]], receptors: [], projection });
    });
    each('receptors', scenario.receptors.length, (index) => {
      deriveDomain({ sources: [], receptors: [scenario.receptors[index]], projection });
    });
    if (issues.length > 0) return issues;
    try {
      domain = deriveDomain({ sources: scenario.sources, receptors: scenario.receptors, projection });
    } catch {
      return null;
    }
  }

  let grid: LocalGrid;
  try {
    checkGridMemory(domain); // before the grid is built, as prepareScenarioGeometry does
    grid = buildLocalGrid(domain, projection);
  } catch {
    return null;
  }
  each('sources', scenario.sources.length, (index) => placeSources([scenario.sources[index]], grid));
  each('receptors', scenario.receptors.length, (index) => placeReceptors([scenario.receptors[index]], grid));
  return issues;
}

/** A field path at the start of a RangeError message: `sources[1].polygon[3]: ...`. */
const LEADING_PATH = /^([A-Za-z_$][\w$]*(?:\[\d+\]|\.[A-Za-z_$][\w$]*)*): ([\s\S]*)$/;

/**
 * Turns a solver RangeError ("<path>: <what>; allowed: ...") into an issue with that path and the
 * scenario's value there. A leading "got ...;" is dropped when the value is shown anyway.
 */
export function issueFromRangeError(error: RangeError, scenario: Scenario): ScenarioIssue {
  const match = LEADING_PATH.exec(error.message);
  if (!match) return { path: '(scenario)', value: undefined, message: error.message };
  const [, path, rest] = match;
  const segments = parsePath(path);
  let value = valueAtPath(scenario, segments);
  if (value === undefined && path === 'domain') value = derivedDomainOrUndefined(scenario);
  const message = value !== undefined ? rest.replace(/^got [^;]*; /, '') : rest;
  return { path: formatPath(segments), value, message };
}

/** `sources[1].polygon[3]` -> ['sources', 1, 'polygon', 3] */
function parsePath(path: string): (string | number)[] {
  const segments: (string | number)[] = [];
  for (const match of path.matchAll(/([A-Za-z_$][\w$]*)|\[(\d+)\]/g)) {
    segments.push(match[1] !== undefined ? match[1] : Number(match[2]));
  }
  return segments;
}

/** The domain a scenario without one would get, to show beside a memory issue; undefined if it cannot be derived. */
function derivedDomainOrUndefined(scenario: Scenario): Domain | undefined {
  try {
    return deriveDomain({ sources: scenario.sources, receptors: scenario.receptors, projection: createLocalProjection(scenario.site) });
  } catch {
    return undefined;
  }
}
