/**
 * Building downwash flag. A stack lower than the good-engineering-practice height, or standing close to a
 * building, releases into the building's wake, where the plume is pulled down to the ground sooner than
 * any of plumeplan's models represent. plumeplan does not model the wake; it flags the stack.
 *
 * Good-engineering-practice height (40 CFR 51.100(ii) [read, via REFERENCES.md]): Hg = H + 1.5 L, with
 * H the building's height and L the lesser of its height and projected width. The wake reaches about
 * 5 L downwind of the building (the same rule's "nearby": within 5 L [from memory; REFERENCES.md gives the
 * height only]), so a stack is flagged when it is below Hg OR within 5 L of the building: either alone puts
 * its plume in the wake.
 */
import type { Building, Source } from '../../scenarios/format/types.ts';

/** Good-engineering-practice height and what it rests on. */
export interface GoodEngineeringPractice {
  /** H + 1.5 L [m] */
  height_m: number;
  /** the lesser of building height and width [m] */
  lesserDimension_m: number;
  /** distance within which the building counts as nearby, 5 L [m] */
  nearbyDistance_m: number;
}

/**
 * Good-engineering-practice stack height for a building (40 CFR 51.100(ii)).
 *
 * @param building height, width and distance [m]
 * @returns Hg = H + 1.5 L and 5 L [m]
 * @example goodEngineeringPracticeHeight({ height_m: 30, width_m: 50, distance_m: 0 }).height_m // 75
 */
export function goodEngineeringPracticeHeight(building: Building): GoodEngineeringPractice {
  for (const [name, value] of [
    ['height_m', building.height_m],
    ['width_m', building.width_m],
  ] as const) {
    if (!(Number.isFinite(value) && value > 0)) throw new RangeError(`building.${name}: ${value} is not allowed (a finite height or width > 0 m)`);
  }
  const lesser = Math.min(building.height_m, building.width_m);
  return { height_m: building.height_m + 1.5 * lesser, lesserDimension_m: lesser, nearbyDistance_m: 5 * lesser };
}

/** One stack's downwash check. */
export interface DownwashFlag {
  sourceId: string;
  stackHeight_m: number;
  building: Building;
  goodEngineeringPracticeHeight_m: number;
  nearbyDistance_m: number;
  /** stack below H + 1.5 L */
  belowGoodEngineeringPractice: boolean;
  /** stack within 5 L of the building */
  withinWake: boolean;
  /** true when either holds (below H + 1.5 L, or within 5 L): the run does not represent this stack's plume near the building */
  flagged: boolean;
  /** plain-language statement for the report */
  message: string;
}

/**
 * Check every point source that names a building.
 *
 * @param sources the scenario's sources; those without a building are skipped
 * @param stackHeights_m optional stack heights replacing the sources' own (a stack-height search)
 * @returns one entry per stack with a building, flagged or not
 */
export function downwashFlags(sources: readonly Source[], stackHeights_m: ReadonlyMap<string, number> = new Map()): DownwashFlag[] {
  const flags: DownwashFlag[] = [];
  for (const source of sources) {
    if (source.kind !== 'point' || source.building === undefined) continue;
    const building = source.building;
    const stackHeight_m = stackHeights_m.get(source.id) ?? source.height_m;
    const gep = goodEngineeringPracticeHeight(building);
    const below = stackHeight_m < gep.height_m;
    const within = building.distance_m < gep.nearbyDistance_m;
    // either condition alone puts the plume in the wake (issue 10: "below GEP height or within 5 L")
    const flagged = below || within;
    const reasons = [
      below ? `lower than the good-engineering-practice height ${round1(gep.height_m)} m (H + 1.5 L, 40 CFR 51.100(ii))` : null,
      within ? `within 5 L = ${round1(gep.nearbyDistance_m)} m of the building` : null,
    ].filter((reason): reason is string => reason !== null);
    const message = flagged
      ? `stack ${source.id} (${round1(stackHeight_m)} m) is ${reasons.join(' and ')}: building downwash is likely, ` +
        'which this screen does not represent; its figures near the building may be too low'
      : `stack ${source.id} (${round1(stackHeight_m)} m) reaches the good-engineering-practice height ${round1(gep.height_m)} m ` +
        `and stands ${round1(building.distance_m)} m from the building, beyond 5 L = ${round1(gep.nearbyDistance_m)} m: not flagged`;
    flags.push({
      sourceId: source.id,
      stackHeight_m,
      building: { ...building },
      goodEngineeringPracticeHeight_m: gep.height_m,
      nearbyDistance_m: gep.nearbyDistance_m,
      belowGoodEngineeringPractice: below,
      withinWake: within,
      flagged,
      message,
    });
  }
  return flags;
}

function round1(value: number): number {
  return Math.round(value * 10) / 10;
}
