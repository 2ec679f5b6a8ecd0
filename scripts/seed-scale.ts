// npm run db:seed:scale -- --customers 5000 [--database rillbook_scale] [--keep]
// A large invented company for benchmarks, generated inside PostgreSQL with set-based inserts
// (INSERT … SELECT over generate_series): N customers, about 1.4 N water features, three seasons
// of contracts (≈ 3 N), their visits, about 1,000,000 water tests for N = 5,000, and the invoices
// the contracts raise. It goes into its own database (rillbook_scale on the project-local server,
// or DATABASE_URL with --url), made fresh unless --keep; progress is printed per step.
// The current season's visits come from its plans' windowed templates (scripts/seed/scale-book.ts),
// sites lie in invented towns and the technicians have capacity and homes, so the season bench
// (bench/planner.ts) can plan the company's real season.
import { parseArgs } from 'node:util'
import pg from 'pg'
// @ts-expect-error plain ESM script without types
import { clusterConfig, ensureDatabase, start as startDb, urlFor } from './db.mjs'
// @ts-expect-error plain ESM script without types
import { runMigrations } from './migrate.mjs'
import { ensureDefaultProfiles } from '../server/services/range-profiles'
import { closeDb, useDb } from '../server/utils/db'
import { hashPassword } from '../server/utils/password'
import { windowVisitDates } from '../server/services/visit-generation'
import { buildVisitSchedule } from '../shared/utils/visit-windows'
import { SCALE_PLANS, SCALE_TECHNICIANS, scalePlaces } from './seed/scale-book'
import { loadScaleSeason } from '../bench/season'
import { planSeason } from '../shared/utils/planner/index'

const { values } = parseArgs({ options: { customers: { type: 'string', default: '5000' }, database: { type: 'string', default: 'rillbook_scale' }, url: { type: 'string' }, keep: { type: 'boolean', default: false } } })
const N = Number(values.customers)
if (!Number.isInteger(N) || N < 1 || N > 200_000) throw new Error('--customers must be a whole number from 1 to 200000')
/** Water tests per feature: weekly over about three seasons (≈ 1,000,000 for 5,000 customers). */
const READINGS_PER_FEATURE = 143

const t0 = Date.now()
const say = (msg: string) => process.stderr.write(`[scale ${((Date.now() - t0) / 1000).toFixed(1).padStart(6)} s] ${msg}\n`)

async function main() {
  let url = values.url
  if (!url) {
    const cfg = clusterConfig({ database: values.database })
    await startDb(cfg)
    await ensureDatabase(cfg, values.database, { fresh: !values.keep })
    url = urlFor(cfg, values.database)
  }
  await runMigrations(url)
  say(`database ready: ${url!.replace(/\/\/[^@]*@/, '//')}`)
  const c = new pg.Client({ connectionString: url })
  await c.connect()
  const step = async (what: string, sql: string, params: unknown[] = []) => {
    const r = await c.query(sql, params)
    say(`${what}: ${r.rowCount ?? 0} rows`)
    return r
  }
  try {
    await c.query('set synchronous_commit = off')
    const { rows: [company] } = await c.query(`insert into companies (name, currency, tax_rate_bp, unit_system, time_zone, payment_terms_days, address, billing_email, base_latitude, base_longitude)
      values ('Larchfield Pond Care (large demo)', 'USD', 725, 'us', 'America/Chicago', 30, '9 Weir Lane\nLarchfield, LF 54100', 'accounts@larchfield-scale.example', 44.14, -91.35) returning id`)
    const companyId = company.id as string
    process.env.DATABASE_URL = url
    await ensureDefaultProfiles(useDb(), companyId)
    await closeDb()
    const { rows: [today] } = await c.query(`select (now() at time zone 'America/Chicago')::date as d`)
    const todayDate: string = today.d.toISOString().slice(0, 10)
    const year = Number(todayDate.slice(0, 4)) - (Number(todayDate.slice(5, 7)) >= 3 ? 0 : 1)
    const seasons = [year - 2, year - 1, year].map(y => `${y}-03-01`)
    const hash = await hashPassword('demo-pond-2026')
    await step('staff', `insert into users (company_id, email, name, role, password_hash)
      select $1, case when g = 0 then 'owner@larchfield-scale.example' else 'tech' || g || '@larchfield-scale.example' end,
             case when g = 0 then 'Scale Owner' else 'Technician ' || g end, case when g = 0 then 'owner'::user_role else 'technician'::user_role end, $2
      from generate_series(0, $3::int) g`, [companyId, hash, SCALE_TECHNICIANS])
    const place = scalePlaces()
    const { rows: techRows } = await c.query(`select id from users where company_id = $1 and role = 'technician' order by email`, [companyId])
    const homes = techRows.map(() => place())
    await step('technicians\' days and homes', `insert into staff_profiles (user_id, capacity_minutes, home_latitude, home_longitude)
      select * from unnest($1::uuid[], $2::int[], $3::float8[], $4::float8[])`, [techRows.map(t => t.id), techRows.map((_, i) => 390 + 15 * (i % 7)), homes.map(h => h.lat), homes.map(h => h.lon)])
    await step('closed days', `insert into closed_days (company_id, day, reason) select $1, d, 'Company holiday' from unnest($2::date[]) d`,
      [companyId, [year - 2, year - 1, year, year + 1].flatMap(y => [`${y}-01-01`, `${y}-07-04`, `${y}-11-26`, `${y}-12-24`, `${y}-12-25`])])
    for (const p of SCALE_PLANS) {
      const { rows: [plan] } = await c.query(`insert into plans (company_id, name, price_minor, currency, billing_cadence, term_months) values ($1, $2, $3, 'USD', $4, 12) returning id`, [companyId, p.name, p.priceMinor, p.billingCadence])
      for (const [position, t] of p.templates.entries()) {
        const w = buildVisitSchedule(t.form)
        await c.query(`insert into plan_visit_templates (plan_id, position, visit_type, rrule, season_from, season_to, tolerance_days, duration_minutes) values ($1, $2, $3, $4, $5, $6, $7, $8)`,
          [plan.id, position, t.visitType, w.rrule, w.from, w.to, w.toleranceDays, t.minutes])
      }
    }
    say(`plans: ${SCALE_PLANS.length}`)
    await step('customers', `insert into customers (company_id, name, kind, billing_line1, billing_city, billing_postcode, created_at)
      select $1, 'Household ' || lpad(g::text, 6, '0'), (case when g % 17 = 0 then 'business' else 'household' end)::customer_kind, (10 + g % 900) || ' Reed Street', 'Larchfield', '54' || lpad((g % 1000)::text, 3, '0'), now() - (g % 900) * interval '1 day'
      from generate_series(1, $2::int) g`, [companyId, N])
    await step('contacts', `insert into customer_contacts (customer_id, name, email) select id, 'Contact of ' || name, 'c' || substr(id::text, 1, 8) || '@households.example' from customers where company_id = $1`, [companyId])
    await step('sites', `insert into sites (company_id, customer_id, name, line1, city) select $1, id, 'Home', billing_line1, 'Larchfield' from customers where company_id = $1`, [companyId])
    const { rows: siteRows } = await c.query(`select id from sites where company_id = $1 order by customer_id`, [companyId])
    const spots = siteRows.map(() => place())
    await step('site positions (in towns)', `update sites s set latitude = x.lat, longitude = x.lon from unnest($1::uuid[], $2::float8[], $3::float8[]) x(id, lat, lon) where s.id = x.id`,
      [siteRows.map(r => r.id), spots.map(p => p.lat), spots.map(p => p.lon)])
    await step('water features', `insert into water_features (company_id, customer_id, site_id, name, kind, shape, surface_area_m2, computed_volume_l, equipment, fish)
      select s.company_id, s.customer_id, s.id, case when k = 1 then 'Pond' else 'Waterfall' end,
             (case when k = 2 then 'pondless_waterfall' when abs(hashtext(s.id::text)) % 3 = 0 then 'koi_pond' else 'water_garden' end)::feature_kind,
             jsonb_build_object('kind', 'rectangle', 'lengthM', 4, 'widthM', 3, 'depthM', 1), 12, 12000,
             jsonb_build_object('pumps', jsonb_build_array(jsonb_build_object('name', 'Main pump', 'role', 'waterfall', 'ratedFlowLph', 9000)), 'intake', 'skimmer', 'biologicalFilter', true, 'wetlandFilter', false, 'aerator', false, 'deIcer', false, 'autoDosing', false, 'ionizer', false, 'notes', ''),
             case when k = 1 then '[{"kind":"koi","count":6}]'::jsonb else '[]'::jsonb end
      from sites s cross join generate_series(1, 2) k
      where s.company_id = $1 and (k = 1 or abs(hashtext(s.id::text)) % 5 < 2)`, [companyId])
    await step('contracts (three seasons)', `insert into contracts (company_id, customer_id, plan_id, status, term_start, term_end, currency, auto_renew, activated_at, ended_at)
      select c.company_id, c.id, p.id, (case when season.start < $2::date then 'ended' else 'active' end)::contract_status, season.start, (season.start + interval '12 months' - interval '1 day')::date,
             'USD', true, season.start::timestamptz, case when season.start < $2::date then (season.start + interval '12 months')::timestamptz end
      from customers c
      cross join (select unnest($3::date[]) as start) season
      join lateral (select id from plans where company_id = c.company_id and name = (case when abs(hashtext(c.id::text)) % 100 < $4 then $5 when abs(hashtext(c.id::text)) % 100 < $6 then $7 else $8 end)) p on true
      where c.company_id = $1 and abs(hashtext(c.id::text || season.start::text)) % 20 <> 0`,
    [companyId, seasons[2], seasons, Math.round(SCALE_PLANS[0]!.share * 100), SCALE_PLANS[0]!.name, Math.round((SCALE_PLANS[0]!.share + SCALE_PLANS[1]!.share) * 100), SCALE_PLANS[1]!.name, SCALE_PLANS[2]!.name])
    await step('contract features', `insert into contract_features (contract_id, feature_id)
      select ct.id, f.id from contracts ct join water_features f on f.customer_id = ct.customer_id where ct.company_id = $1`, [companyId])
    await step('visits (earlier seasons)', `insert into visits (company_id, contract_id, customer_id, site_id, visit_type, status, scheduled_on, starts_at, duration_minutes, technician_id, finished_at)
      select ct.company_id, ct.id, ct.customer_id, s.id, 'routine', (case when d.day < $2::date then 'done' else 'scheduled' end)::visit_status, d.day,
             (d.day + time '14:00') at time zone 'UTC', 60, t.id, case when d.day < $2::date then (d.day + time '15:00') at time zone 'UTC' end
      from contracts ct join sites s on s.customer_id = ct.customer_id
      cross join lateral (select (date_trunc('week', ct.term_start + (14 + 21 * k) * interval '1 day')::date + (w / 5) * 7 + w % 5) as day
        from generate_series(0, 12) k, (select abs(hashtext(ct.customer_id::text || ':day')) % 15 as w) h) d
      join lateral (select id from users where company_id = ct.company_id and role = 'technician' order by email offset (abs(hashtext(ct.customer_id::text)) % $3) limit 1) t on true
      where ct.company_id = $1 and ct.term_start < $4::date`, [companyId, todayDate, SCALE_TECHNICIANS, seasons[2]])
    await currentSeasonVisits(c, companyId, seasons[2]!, todayDate, techRows.map(t => t.id as string), say)
    await planCurrentSeason(c, companyId, todayDate, say)
    await step('water tests', `insert into readings (id, company_id, feature_id, source, taken_at, temperature_c, ph, total_ammonia_mg_l, nitrite_mg_l, kh_mg_l, overall, evaluation)
      select gen_random_uuid(), f.company_id, f.id, 'technician', ($2::date - (k * 7) * interval '1 day') + time '15:00',
             round((14 + 10 * sin(k * 2 * pi() / 52) + random() * 2)::numeric, 1), round((7.0 + random() * 1.4)::numeric, 2), round((random() * 0.4)::numeric, 2),
             round((random() * 0.2)::numeric, 2), round((60 + random() * 120)::numeric, 0), case when random() < 0.05 then 'watch' else 'ok' end, '[]'::jsonb
      from water_features f cross join generate_series(0, $3::int - 1) k where f.company_id = $1`, [companyId, todayDate, READINGS_PER_FEATURE])
    await step('invoices', `insert into invoices (company_id, customer_id, contract_id, source, billing_key, status, currency, tax_rate_bp, subtotal_minor, tax_minor, total_minor, amount_paid_minor, issue_date, due_date, period_start, period_end, sent_at, paid_at, payment_method, provider_synced_at)
      select x.company_id, x.customer_id, x.contract_id, x.source::invoice_source, x.key, (case when x.issue < $2::date - 45 then 'paid' else 'due' end)::invoice_status, 'USD', 725, x.price,
             round(x.price * 0.0725)::int, x.price + round(x.price * 0.0725)::int, case when x.issue < $2::date - 45 then x.price + round(x.price * 0.0725)::int else 0 end,
             x.issue, x.issue + 30, x.pstart, x.pend, x.issue::timestamptz, case when x.issue < $2::date - 45 then (x.issue + 12)::timestamptz end, case when x.issue < $2::date - 45 then 'card' end, now()
      from (
        select ct.company_id, ct.customer_id, ct.id as contract_id, 'contract_term' as source, 'term:' || ct.id as key, p.price_minor as price, ct.term_start - 14 as issue, ct.term_start as pstart, ct.term_end as pend
          from contracts ct join plans p on p.id = ct.plan_id where ct.company_id = $1 and p.billing_cadence = 'yearly'
        union all
        select ct.company_id, ct.customer_id, ct.id, 'contract_month', 'month:' || ct.id || ':' || m.start, p.price_minor, m.start, m.start, (m.start + interval '1 month' - interval '1 day')::date
          from contracts ct join plans p on p.id = ct.plan_id
          cross join lateral (select (ct.term_start + k * interval '1 month')::date as start from generate_series(0, 11) k) m
          where ct.company_id = $1 and p.billing_cadence = 'monthly' and m.start <= $2::date
        union all
        select v.company_id, v.customer_id, v.contract_id, 'visit', 'visit:' || v.id, p.price_minor, v.scheduled_on, v.scheduled_on, v.scheduled_on
          from visits v join contracts ct on ct.id = v.contract_id join plans p on p.id = ct.plan_id
          where v.company_id = $1 and p.billing_cadence = 'per_visit' and v.status = 'done'
      ) x`, [companyId, todayDate])
    await step('invoice numbers', `update invoices i set number = n.y || '-' || lpad(n.seq::text, 5, '0'), number_year = n.y, number_seq = n.seq
      from (select id, extract(year from issue_date)::int as y, row_number() over (partition by extract(year from issue_date) order by issue_date, id) as seq from invoices where company_id = $1) n
      where i.id = n.id`, [companyId])
    await c.query(`insert into invoice_counters (company_id, year, last_seq) select company_id, number_year, max(number_seq) from invoices where company_id = $1 group by 1, 2`, [companyId])
    await step('invoice lines', `insert into invoice_lines (invoice_id, kind, description, quantity, unit_price_minor, amount_minor)
      select id, case when source = 'visit' then 'visit'::invoice_line_kind else 'plan'::invoice_line_kind end, 'Service ' || coalesce(period_start::text, ''), 1, subtotal_minor, subtotal_minor from invoices where company_id = $1`, [companyId])
    await c.query('analyze')
    const { rows: [n] } = await c.query(`select (select count(*) from customers where company_id = $1)::int as customers, (select count(*) from water_features where company_id = $1)::int as features,
      (select count(*) from contracts where company_id = $1)::int as contracts, (select count(*) from visits where company_id = $1)::int as visits,
      (select count(*) from readings where company_id = $1)::int as readings, (select count(*) from invoices where company_id = $1)::int as invoices`, [companyId])
    say(`done: ${JSON.stringify(n)}; sign in as owner@larchfield-scale.example / demo-pond-2026`)
    process.stdout.write(`${JSON.stringify({ url, companyId, ...n, seconds: (Date.now() - t0) / 1000 })}\n`)
  }
  finally {
    await c.end()
  }
}

/**
 * The current season's visits, one per window of each template (windowVisitDates, as contract
 * activation makes them) with the same generation keys; each customer's visits with one
 * technician by hash (the book before planning), past ones done.
 */
async function currentSeasonVisits(c: pg.Client, companyId: string, seasonStart: string, today: string, technicianIds: string[], log: (m: string) => void) {
  const { rows: [company] } = await c.query(`select working_days from companies where id = $1`, [companyId])
  const closed = new Set((await c.query(`select day::text as day from closed_days where company_id = $1`, [companyId])).rows.map(r => r.day as string))
  const { rows: templates } = await c.query(`select id, plan_id as "planId", position, visit_type as "visitType", rrule, season_from as "seasonFrom", season_to as "seasonTo", tolerance_days as "toleranceDays", duration_minutes as "durationMinutes"
    from plan_visit_templates t where plan_id in (select id from plans where company_id = $1)`, [companyId])
  const { rows: list } = await c.query(`select ct.id, ct.customer_id, ct.plan_id, ct.term_start::text as term_start, ct.term_end::text as term_end, s.id as site_id
    from contracts ct join sites s on s.customer_id = ct.customer_id where ct.company_id = $1 and ct.term_start = $2::date`, [companyId, seasonStart])
  const windows = new Map<string, ReturnType<typeof windowVisitDates>>()
  const templateOf = new Map(templates.map(t => [t.id as string, t]))
  const cols = { contract: [] as string[], customer: [] as string[], site: [] as string[], template: [] as string[], type: [] as string[], status: [] as string[], day: [] as string[], minutes: [] as number[], tech: [] as string[], key: [] as string[] }
  const flush = async () => {
    if (!cols.contract.length) return
    await c.query(`insert into visits (company_id, contract_id, customer_id, site_id, template_id, visit_type, status, scheduled_on, starts_at, duration_minutes, technician_id, generation_key, finished_at)
      select $1, x.contract, x.customer, x.site, x.template, x.type::visit_type, x.status::visit_status, x.day, (x.day + time '14:00') at time zone 'UTC', x.minutes, x.tech, x.key,
             case when x.status = 'done' then (x.day + time '15:00') at time zone 'UTC' end
      from unnest($2::uuid[], $3::uuid[], $4::uuid[], $5::uuid[], $6::text[], $7::text[], $8::date[], $9::int[], $10::uuid[], $11::text[]) x(contract, customer, site, template, type, status, day, minutes, tech, key)`,
    [companyId, cols.contract, cols.customer, cols.site, cols.template, cols.type, cols.status, cols.day, cols.minutes, cols.tech, cols.key])
    for (const k of Object.keys(cols) as Array<keyof typeof cols>) cols[k].length = 0
  }
  let n = 0
  for (const ct of list) {
    const wkey = `${ct.plan_id}|${ct.term_start}|${ct.term_end}`
    if (!windows.has(wkey)) windows.set(wkey, windowVisitDates(templates.filter(t => t.planId === ct.plan_id) as Parameters<typeof windowVisitDates>[0], { start: ct.term_start, end: ct.term_end }, { workingDays: company.working_days, closed }))
    const tech = technicianIds[Math.abs(hashOf(ct.customer_id)) % technicianIds.length]!
    for (const w of windows.get(wkey)!) {
      cols.contract.push(ct.id); cols.customer.push(ct.customer_id); cols.site.push(ct.site_id); cols.template.push(w.templateId)
      cols.type.push(templateOf.get(w.templateId)!.visitType); cols.status.push(w.date < today ? 'done' : 'scheduled'); cols.day.push(w.date)
      cols.minutes.push(templateOf.get(w.templateId)!.durationMinutes); cols.tech.push(tech); cols.key.push(`${w.key}:${ct.site_id}`)
      n++
      if (cols.contract.length >= 20_000) await flush()
    }
  }
  await flush()
  log(`visits (current season, from the plans' windows): ${n} rows`)
}

/**
 * The current season as a company using the product would have it: planned by the season planner
 * (bench/season.ts reads it as the planner's input) within each technician's capacity, in driving
 * order, with the planner's reason on each visit it could not place. Past visits are done.
 */
async function planCurrentSeason(c: pg.Client, companyId: string, today: string, log: (m: string) => void) {
  const { input } = await loadScaleSeason(c, companyId)
  const plan = planSeason(input)
  const { rows: [company] } = await c.query(`select time_zone, day_start_time::text as start from companies where id = $1`, [companyId])
  const ids = [...plan.placed.map(p => p.visitId), ...plan.unplaced.map(u => u.visitId)]
  const days = [...plan.placed.map(p => p.day), ...plan.unplaced.map(() => null)]
  const techs = [...plan.placed.map(p => p.technicianId), ...plan.unplaced.map(() => null)]
  const reasons = [...plan.placed.map(() => null), ...plan.unplaced.map(u => u.reason)]
  await c.query(`update visits v set scheduled_on = coalesce(x.day, v.scheduled_on),
      starts_at = (coalesce(x.day, v.scheduled_on) + $6::time) at time zone $7, technician_id = x.tech, unplaced_reason = x.reason,
      status = (case when x.day is not null and x.day < $8::date then 'done' else 'scheduled' end)::visit_status,
      finished_at = case when x.day is not null and x.day < $8::date then (x.day + $6::time + interval '1 hour') at time zone $7 end
    from unnest($2::uuid[], $3::date[], $4::uuid[], $5::text[]) x(id, day, tech, reason) where v.id = x.id and v.company_id = $1`,
  [companyId, ids, days, techs, reasons, company.start, company.time_zone, today])
  log(`current season planned: ${plan.stats.placed} placed, ${plan.stats.unplaced} unplaced, ${plan.stats.daysOverCapacity} technician-days over capacity`)
}

/** A small string hash (FNV-1a), for spreading customers over technicians the same way every run. */
function hashOf(text: string) {
  let h = 0x811C9DC5
  for (let i = 0; i < text.length; i++) h = Math.imul(h ^ text.charCodeAt(i), 16777619)
  return h | 0
}

main().catch((err) => {
  say(err.stack || err.message)
  process.exitCode = 1
})
