/**
 * Everything a run needs to know about where things are: the local projection about the site,
 * the domain (given or derived), the grid, and the sources and receptors placed on it.
 */
import type { Domain, Scenario } from '../../scenarios/format/types.ts';
import type { PlacedReceptor, PlacedSource } from '../drivers/types.ts';
import { placeReceptors, placeSources } from '../sources/placement.ts';
import { checkGridMemory, deriveDomainWithReasons, type DomainCoarsening } from './domainDefaults.ts';
import { buildLocalGrid } from './localGrid.ts';
import { createLocalProjection } from './projection.ts';
import { placeSiteBoundary, siteColumns, type SiteColumns } from './siteBoundary.ts';
import type { LocalGrid, LocalProjection } from './types.ts';

export interface ScenarioGeometry {
  projection: LocalProjection;
  /** the scenario's domain, or the derived one when it gives none */
  domain: Domain;
  /** true when `domain` was derived from the sources and receptors */
  domainDerived: boolean;
  /** null, or why a derived domain has coarser cells than its sources' near field takes (a far receptor and the cell limit) */
  domainCoarsening: DomainCoarsening | null;
  grid: LocalGrid;
  sources: PlacedSource[];
  receptors: PlacedReceptor[];
  /** the site boundary's columns; null when the scenario gives no site.boundary */
  site: SiteColumns | null;
}

/**
 * Projection, domain, grid and placement for a scenario, in that order. The memory check runs on
 * the domain's numbers before the grid or any source share is built, so a grid that would exhaust
 * memory is refused before anything is allocated for it.
 *
 * @throws RangeError naming the field (`site.lat`, `domain.spacing_m`, `domain: ...` for memory,
 *   `sources[i]...`, `receptors[i]...`)
 * @example const { grid, sources, receptors } = prepareScenarioGeometry(scenario);
 */
export function prepareScenarioGeometry(scenario: Scenario): ScenarioGeometry {
  const projection = createLocalProjection(scenario.site);
  const domainDerived = scenario.domain === undefined;
  const derived = domainDerived
    ? deriveDomainWithReasons({ sources: scenario.sources, receptors: scenario.receptors, projection })
    : null;
  const domain = scenario.domain ?? derived!.domain;
  checkGridMemory(domain);
  const grid = buildLocalGrid(domain, projection);
  return {
    projection,
    domain,
    domainDerived,
    domainCoarsening: derived?.coarsening ?? null,
    grid,
    sources: placeSources(scenario.sources, grid),
    receptors: placeReceptors(scenario.receptors, grid),
    site: scenario.site.boundary === undefined ? null : siteColumns(grid, placeSiteBoundary(scenario.site.boundary, projection)),
  };
}
