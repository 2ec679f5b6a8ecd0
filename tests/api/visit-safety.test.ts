import { beforeAll, describe, expect, it } from 'vitest'
import { api, demo, tokenFor, uniqueEmail } from '../helpers/api'

// Safety in context (PRODUCT.md, Safety): generated visit checklists carry the cautions where
// they apply, from one place (server/services/visit-safety.ts).

let owner: string
beforeAll(async () => {
  owner = await tokenFor(demo.owner)
})

/** A contract on a plan with a spring clean-out (April), a winter water test (January) and a net clean-out (October), for a pond `depthM` deep. */
async function generated(label: string, depthM: number) {
  const c = await api('/api/customers', { method: 'POST', token: owner, body: { name: `Safety ${label}`, kind: 'household', contacts: [{ name: 'Reader', email: uniqueEmail(`safety-${label}`) }] } })
  const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: '9 Test Row', city: 'Larchfield', latitude: 44.151, longitude: -91.341 } })
  const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 4, widthM: 3, depthM }, fish: [{ kind: 'koi', count: 4 }] } })
  expect(f.status, JSON.stringify(f.body)).toBe(201)
  const plan = await api('/api/plans', {
    method: 'POST', token: owner, body: {
      name: `Safety plan ${label}`, priceMinor: 10_000, currency: 'USD', billingCadence: 'per_visit', termMonths: 12, templates: [
        { visitType: 'spring_cleanout', rrule: 'FREQ=YEARLY;BYMONTH=4;BYDAY=MO;BYSETPOS=2', durationMinutes: 240, checklist: [{ label: 'Debris removed' }] },
        { visitType: 'water_test', rrule: 'FREQ=YEARLY;BYMONTH=1;BYDAY=TU;BYSETPOS=2', durationMinutes: 30, checklist: [{ label: 'Water tested' }] },
        { visitType: 'net_cleanout', rrule: 'FREQ=YEARLY;BYMONTH=10;BYDAY=TH;BYSETPOS=2', durationMinutes: 45, checklist: [{ label: 'Leaves cleared from the net' }] },
      ],
    },
  })
  expect(plan.status, JSON.stringify(plan.body)).toBe(201)
  // A term that starts next January 1st: all three visits lie ahead whatever the date today.
  const year = new Date().getUTCFullYear() + 1
  const contract = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: c.body.id, planId: plan.body.id, featureIds: [f.body.id], termStart: `${year}-01-01` } })
  await api(`/api/contracts/${contract.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })
  const rows = (await api(`/api/visits?contractId=${contract.body.id}&pageSize=100`, { token: owner })).body.rows as Array<{ id: string, visitType: string }>
  const checklists: Record<string, string[]> = {}
  for (const r of rows) checklists[r.visitType] = ((await api(`/api/visits/${r.id}`, { token: owner })).body.checklist as Array<{ label: string }>).map(c => c.label)
  return checklists
}

describe('safety items in visit checklists', () => {
  it('deep water, ice in winter, fish held and acclimated at the spring clean-out, gloves and no mixing where chemicals are dosed', async () => {
    const deep = await generated('deep', 1.2)
    const spring = deep.spring_cleanout!.join('\n')
    expect(spring).toMatch(/do not work alone/)
    expect(spring).toMatch(/Hold fish in pond water, in a shaded and aerated container/)
    expect(spring).toMatch(/float the fish until the temperatures match/)
    expect(spring).toMatch(/temperatures match/)
    expect(spring).toMatch(/gloves and eye protection.*never mix products/)
    expect(deep.spring_cleanout).toContain('Debris removed')
    const winter = deep.water_test!.join('\n')
    expect(winter).toMatch(/stay off ice/)
    expect(winter).toMatch(/do not work alone/) // 1.2 m is deep water
    expect(winter).not.toMatch(/Hold fish in pond water/)
    // A net clean-out in October: no chemicals, no ice, but deep water.
    const net = deep.net_cleanout!.join('\n')
    expect(net).toMatch(/do not work alone/)
    expect(net).not.toMatch(/gloves|stay off ice/)
  })

  it('a shallow feature is not "deep water" at a visit that stays out of the water', async () => {
    // 0.4 m is below the 0.6 m the product counts as deep (common practice, no source).
    const shallow = await generated('shallow', 0.4)
    expect(shallow.net_cleanout!.join('\n')).not.toMatch(/do not work alone/)
    expect(shallow.water_test!.join('\n')).not.toMatch(/do not work alone/)
    // The spring clean-out works in the water: nobody alone, however shallow.
    expect(shallow.spring_cleanout!.join('\n')).toMatch(/do not work alone/)
  })
})
