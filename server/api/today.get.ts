import { getCompany } from '../services/company'

// The technician's day. Visits arrive with contracts and schedules; until then the list is empty.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'today.read' })
  const company = await getCompany(user)
  const date = new Intl.DateTimeFormat('en-CA', { timeZone: company.timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date())
  return { date, timeZone: company.timeZone, technician: { id: user.id, name: user.name }, stops: [] as never[] }
})
