// The planner's work in steps, so a caller can show its progress: each planning function has a
// generator twin (planSeasonSteps, replanDateRangeSteps) that yields a PlannerProgress every
// PLANNER_STEP_VISITS visits and returns the result. The plain functions drive it to the end at
// once (runPlannerSteps); the server drives it asynchronously (server/services/replan.ts), giving
// the event loop a turn between steps so progress reaches the page. Same input, same result.

/** Where the planner is: `done` of `total` visits placed (or tried); `done` never goes down. */
export interface PlannerProgress {
  stage: 'planning' | 'repairing'
  done: number
  total: number
}

export type PlannerSteps<T> = Generator<PlannerProgress, T, void>

/** Visits placed between two progress steps. */
export const PLANNER_STEP_VISITS = 250

/** Runs a planner generator to its end and returns its result (the synchronous way). */
export function runPlannerSteps<T>(steps: PlannerSteps<T>): T {
  for (;;) {
    const r = steps.next()
    if (r.done) return r.value
  }
}
