// The season planner (pure, deterministic): visits with windows + technicians with capacity,
// working days, days off and home base → a day and a technician for each visit, or the reason
// it has no place. See plan-season.ts for the method. Not auto-imported (a subfolder): import
// from '#shared/utils/planner' (app, server) or '../shared/utils/planner/index' (scripts).
//
// Wiring, in short:
//   const windows = expandVisitSchedule(template.schedule, { start: termStart, end: termEnd }) // visit-windows.ts
//   visits = windows.map(w => ({ id: `${template.id}:${w.key}`, windowEarliest: w.earliest, windowLatest: w.latest,
//     preferred: w.preferred, durationMinutes, siteId, lat, lon, customerId,
//     locked: movedByHand ? { day, technicianId } : undefined }))
//   const plan = planSeason({ visits, technicians, closedDays, speedKmh, detourFactor, previousAssignments })
//   plan.placed → write day and technician; plan.unplaced → the tray, with plan.unplaced[i].reason;
//   plan.days → each day's load against capacity (visits + driving).
//   replanDateRange(input, currentPlacements, { from, to }).moves → the preview; apply only on confirmation.
//   planSeasonSteps / replanDateRangeSteps: the same work as a generator yielding progress (steps.ts).
export { planSeason, planSeasonSteps, PLANNER_WEIGHTS } from './plan-season'
export { planSeasonBaseline } from './baseline'
export { replanDateRange, replanDateRangeSteps, type CurrentPlacement } from './replan'
export { runPlannerSteps, PLANNER_STEP_VISITS, type PlannerProgress, type PlannerSteps } from './steps'
export { plannerDateWords } from './words'
export {
  PlannerInputError,
  type PlannerInput, type PlannerVisit, type PlannerTechnician, type PlannerPlacement, type PlannerUnplaced,
  type PlannerUnplacedCode, type PlannerDay, type PlannerStats, type SeasonPlan, type PlannerMove, type ReplanPreview,
} from './types'
