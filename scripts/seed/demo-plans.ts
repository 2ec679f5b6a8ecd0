// The demo company's own plans (invented names and prices). Prices are minor units (cents) billed
// per cadence period: per year, per month or per visit.
import type { BillingCadence, VisitType } from '../../shared/types/schedule'

/** `rrule` is the rhythm (FREQ=YEARLY = once in the season), `from`/`to` the season as MM-DD, `toleranceDays` the give or take. */
interface DemoTemplate { visitType: VisitType, rrule: string, from: string, to: string, toleranceDays: number, durationMinutes: number, checklist: string[] }
export interface DemoPlan { key: string, name: string, description: string, priceMinor: number, billingCadence: BillingCadence, termMonths: number, templates: DemoTemplate[] }

const CHECK = {
  spring: ['Pumps pulled, cleaned and restarted', 'Debris and sludge removed', 'Skimmer and filter media rinsed in pond water', 'Plants divided and trimmed', 'UV bulb and quartz sleeve checked', 'Water tested', 'Beneficial bacteria dosed', 'GFCI/RCD outlets tested'],
  routine: ['Skimmer net and basket emptied', 'Filter pads rinsed', 'Plants trimmed', 'Pump flow and lights checked', 'Water level topped up (dechlorinated)', 'Water tested', 'Fish observed'],
  netInstall: ['Leaf net fitted and staked', 'Net clear of the water surface', 'Skimmer emptied'],
  netCleanout: ['Leaves cleared from the net', 'Skimmer emptied', 'Water level checked'],
  shutdown: ['Net removed and stored', 'Pumps pulled or set for winter', 'Plumbing drained where it would freeze', 'De-icer or aerator in place and tested on GFCI/RCD', 'UV clarifier off and drained', 'Water tested'],
  waterTest: ['Water tested', 'De-icer or aerator running', 'Fish observed'],
}

// The winter test's windows (every 5 weeks, give or take 17 days) join up from December to
// March, so there is winter work on any day of it.
export const demoPlans: DemoPlan[] = [
  {
    key: 'plan-seasonal', name: 'Seasonal Care', priceMinor: 145_000, billingCadence: 'yearly', termMonths: 12,
    description: 'Spring clean-out, a visit every two weeks from May to September, leaf net on in October with a clean-out every two weeks, and the fall shutdown.',
    templates: [
      { visitType: 'spring_cleanout', rrule: 'FREQ=YEARLY', from: '04-01', to: '04-30', toleranceDays: 0, durationMinutes: 240, checklist: CHECK.spring },
      { visitType: 'routine', rrule: 'FREQ=WEEKLY;INTERVAL=2', from: '05-01', to: '09-30', toleranceDays: 3, durationMinutes: 60, checklist: CHECK.routine },
      { visitType: 'net_install', rrule: 'FREQ=YEARLY', from: '10-01', to: '10-15', toleranceDays: 0, durationMinutes: 90, checklist: CHECK.netInstall },
      { visitType: 'net_cleanout', rrule: 'FREQ=WEEKLY;INTERVAL=2', from: '10-16', to: '11-15', toleranceDays: 4, durationMinutes: 45, checklist: CHECK.netCleanout },
      { visitType: 'fall_shutdown', rrule: 'FREQ=YEARLY', from: '11-10', to: '11-30', toleranceDays: 0, durationMinutes: 120, checklist: CHECK.shutdown },
    ],
  },
  {
    key: 'plan-koi-year', name: 'Koi Keeper, all year', priceMinor: 18_900, billingCadence: 'monthly', termMonths: 12,
    description: 'For fish ponds: weekly summer visits, leaf-net season, and a winter water test every five weeks or so with the de-icer checked.',
    templates: [
      { visitType: 'spring_cleanout', rrule: 'FREQ=YEARLY', from: '04-01', to: '04-20', toleranceDays: 0, durationMinutes: 300, checklist: CHECK.spring },
      { visitType: 'routine', rrule: 'FREQ=WEEKLY', from: '05-01', to: '09-30', toleranceDays: 2, durationMinutes: 60, checklist: CHECK.routine },
      { visitType: 'net_install', rrule: 'FREQ=YEARLY', from: '10-01', to: '10-15', toleranceDays: 0, durationMinutes: 90, checklist: CHECK.netInstall },
      { visitType: 'net_cleanout', rrule: 'FREQ=WEEKLY', from: '10-16', to: '11-15', toleranceDays: 2, durationMinutes: 45, checklist: CHECK.netCleanout },
      { visitType: 'fall_shutdown', rrule: 'FREQ=YEARLY', from: '11-10', to: '11-30', toleranceDays: 0, durationMinutes: 150, checklist: CHECK.shutdown },
      { visitType: 'water_test', rrule: 'FREQ=WEEKLY;INTERVAL=5', from: '12-01', to: '03-31', toleranceDays: 17, durationMinutes: 30, checklist: CHECK.waterTest },
    ],
  },
  {
    key: 'plan-spring-fall', name: 'Spring & Fall Essentials', priceMinor: 32_500, billingCadence: 'per_visit', termMonths: 12,
    description: 'Just the two big days: the spring clean-out and the fall shutdown, billed per visit.',
    templates: [
      { visitType: 'spring_cleanout', rrule: 'FREQ=YEARLY', from: '04-10', to: '04-30', toleranceDays: 0, durationMinutes: 240, checklist: CHECK.spring },
      { visitType: 'fall_shutdown', rrule: 'FREQ=YEARLY', from: '11-01', to: '11-20', toleranceDays: 0, durationMinutes: 120, checklist: CHECK.shutdown },
    ],
  },
  {
    key: 'plan-pondless', name: 'Pondless Tune-Up', priceMinor: 39_500, billingCadence: 'yearly', termMonths: 12,
    description: 'For pondless waterfalls and fountains: spring start-up, a monthly summer check of pump vault and dosing, and winter shutdown.',
    templates: [
      { visitType: 'spring_cleanout', rrule: 'FREQ=YEARLY', from: '04-15', to: '05-10', toleranceDays: 0, durationMinutes: 120, checklist: CHECK.spring },
      { visitType: 'routine', rrule: 'FREQ=MONTHLY', from: '05-01', to: '09-30', toleranceDays: 5, durationMinutes: 45, checklist: CHECK.routine },
      { visitType: 'fall_shutdown', rrule: 'FREQ=YEARLY', from: '10-15', to: '10-31', toleranceDays: 0, durationMinutes: 90, checklist: CHECK.shutdown },
    ],
  },
]

/** Closed days (invented company holidays), as month-day; the seed applies them to each season's years. */
export const demoClosedMonthDays = [['01-01', 'New Year'], ['07-03', 'Summer closure'], ['11-26', 'Company holiday'], ['12-24', 'Winter closure'], ['12-25', 'Winter closure']] as const
