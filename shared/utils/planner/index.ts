// The season planner (pure, deterministic): visits with windows + technicians with capacity,
// working days, days off and home base → a day and a technician for each visit, or the reason
// it has no place. See plan-season.ts for the method.
export { planSeason, PLANNER_WEIGHTS } from './plan-season'
export { planSeasonBaseline } from './baseline'
export { replanDateRange, type CurrentPlacement } from './replan'
export { plannerDateWords } from './words'
export {
  PlannerInputError,
  type PlannerInput, type PlannerVisit, type PlannerTechnician, type PlannerPlacement, type PlannerUnplaced,
  type PlannerUnplacedCode, type PlannerDay, type PlannerStats, type SeasonPlan, type PlannerMove, type ReplanPreview,
} from './types'
