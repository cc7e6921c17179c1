/**
 * Which parts of `npm run bench` run: PLUMEPLAN_BENCH_SECTIONS, a comma list (default every section), read
 * by tests/bench/run.ts and by the parts that have sections of their own (assessment.ts), so that one
 * part can be run without the others (the grid screening set alone takes about half an hour).
 */

/** Every section of the bench, in the order run.ts runs them. */
export const ALL_SECTIONS = ['transport', 'bandwidth', 'steady', 'siting', 'weather', 'server', 'mapPage', 'assessment'] as const;

/** The assessment part's own sections, by the names of the lines they print. */
export const ASSESSMENT_SECTIONS = ['screening-set', 'stack-height-sweep'] as const;

/** The server part's own sections: the reads during two runs, the consultation pack, cancelling a sweep. */
export const SERVER_SECTIONS = ['server-reads', 'server-pack', 'server-cancel'] as const;

/** The sections asked for (every one when PLUMEPLAN_BENCH_SECTIONS is unset or empty). */
export function benchSections(value = process.env.PLUMEPLAN_BENCH_SECTIONS): Set<string> {
  const named = (value ?? '').split(',').map((name) => name.trim()).filter((name) => name !== '');
  return new Set(named.length > 0 ? named : [...ALL_SECTIONS]);
}

/** Whether any of the assessment part runs. */
export function wantsAssessment(sections: Set<string>): boolean {
  return sections.has('assessment') || ASSESSMENT_SECTIONS.some((name) => sections.has(name));
}

/** Whether one of the assessment part's sections runs: asked for by its name or with the whole part. */
export function wantsAssessmentSection(sections: Set<string>, name: (typeof ASSESSMENT_SECTIONS)[number]): boolean {
  return sections.has('assessment') || sections.has(name);
}

/** Whether any of the server part runs. */
export function wantsServer(sections: Set<string>): boolean {
  return sections.has('server') || SERVER_SECTIONS.some((name) => sections.has(name));
}

/** Whether one of the server part's sections runs: asked for by its name or with the whole part. */
export function wantsServerSection(sections: Set<string>, name: (typeof SERVER_SECTIONS)[number]): boolean {
  return sections.has('server') || sections.has(name);
}
