// npm run db:seed:scale -- --customers 5000 [--database rillbook_scale] [--keep]
// A large invented company for benchmarks, generated inside PostgreSQL with set-based inserts
// (INSERT … SELECT over generate_series): N customers, about 1.4 N water features, three seasons
// of contracts (≈ 3 N), their visits, about 1,000,000 water tests for N = 5,000, and the invoices
// the contracts raise. It goes into its own database (rillbook_scale on the project-local server,
// or DATABASE_URL with --url), made fresh unless --keep; progress is printed per step.
import { parseArgs } from 'node:util'
import pg from 'pg'
// @ts-expect-error plain ESM script without types
import { clusterConfig, ensureDatabase, start as startDb, urlFor } from './db.mjs'
// @ts-expect-error plain ESM script without types
import { runMigrations } from './migrate.mjs'
import { ensureDefaultProfiles } from '../server/services/range-profiles'
import { closeDb, useDb } from '../server/utils/db'
import { hashPassword } from '../server/utils/password'

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
      from generate_series(0, 20) g`, [companyId, hash])
    await step('plans', `insert into plans (company_id, name, price_minor, currency, billing_cadence, term_months)
      values ($1, 'Seasonal Care', 145000, 'USD', 'yearly', 12), ($1, 'Koi Keeper, all year', 18900, 'USD', 'monthly', 12),
             ($1, 'Spring & Fall Essentials', 32500, 'USD', 'per_visit', 12), ($1, 'Pondless Tune-Up', 39500, 'USD', 'yearly', 12)`, [companyId])
    await c.query(`insert into plan_visit_templates (plan_id, visit_type, rrule, duration_minutes) select id, 'routine', 'FREQ=WEEKLY;INTERVAL=3;BYMONTH=3,4,5,6,7,8,9,10,11', 60 from plans where company_id = $1`, [companyId])
    await step('customers', `insert into customers (company_id, name, kind, billing_line1, billing_city, billing_postcode, created_at)
      select $1, 'Household ' || lpad(g::text, 6, '0'), (case when g % 17 = 0 then 'business' else 'household' end)::customer_kind, (10 + g % 900) || ' Reed Street', 'Larchfield', '54' || lpad((g % 1000)::text, 3, '0'), now() - (g % 900) * interval '1 day'
      from generate_series(1, $2::int) g`, [companyId, N])
    await step('contacts', `insert into customer_contacts (customer_id, name, email) select id, 'Contact of ' || name, 'c' || substr(id::text, 1, 8) || '@households.example' from customers where company_id = $1`, [companyId])
    await step('sites', `insert into sites (company_id, customer_id, name, line1, city, latitude, longitude)
      select $1, id, 'Home', billing_line1, 'Larchfield', 44.05 + random() * 0.2, -91.5 + random() * 0.3 from customers where company_id = $1`, [companyId])
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
      join lateral (select id from plans where company_id = c.company_id order by name offset (abs(hashtext(c.id::text)) % 4) limit 1) p on true
      where c.company_id = $1 and abs(hashtext(c.id::text || season.start::text)) % 20 <> 0`, [companyId, seasons[2], seasons])
    await step('contract features', `insert into contract_features (contract_id, feature_id)
      select ct.id, f.id from contracts ct join water_features f on f.customer_id = ct.customer_id where ct.company_id = $1`, [companyId])
    await step('visits', `insert into visits (company_id, contract_id, customer_id, site_id, visit_type, status, scheduled_on, starts_at, duration_minutes, technician_id, finished_at)
      select ct.company_id, ct.id, ct.customer_id, s.id, 'routine', (case when d.day < $2::date then 'done' else 'scheduled' end)::visit_status, d.day,
             (d.day + time '14:00') at time zone 'UTC', 60, t.id, case when d.day < $2::date then (d.day + time '15:00') at time zone 'UTC' end
      from contracts ct join sites s on s.customer_id = ct.customer_id
      cross join lateral (select (ct.term_start + (14 + 21 * k) * interval '1 day')::date as day from generate_series(0, 12) k) d
      join lateral (select id from users where company_id = ct.company_id and role = 'technician' order by email offset (abs(hashtext(ct.customer_id::text)) % 20) limit 1) t on true
      where ct.company_id = $1`, [companyId, todayDate])
    await step('water tests', `insert into readings (id, company_id, feature_id, source, taken_at, temperature_c, ph, total_ammonia_mg_l, nitrite_mg_l, kh_mg_l, overall, evaluation)
      select gen_random_uuid(), f.company_id, f.id, 'technician', ($2::date - (k * 7) * interval '1 day') + time '15:00',
             round((14 + 10 * sin(k * 2 * pi() / 52) + random() * 2)::numeric, 1), round((7.0 + random() * 1.4)::numeric, 2), round((random() * 0.4)::numeric, 2),
             round((random() * 0.2)::numeric, 2), round((60 + random() * 120)::numeric, 0), case when random() < 0.05 then 'watch' else 'ok' end, '[]'::jsonb
      from water_features f cross join generate_series(0, $3::int - 1) k where f.company_id = $1`, [companyId, todayDate, READINGS_PER_FEATURE])
    await step('invoices', `insert into invoices (company_id, customer_id, contract_id, source, billing_key, status, currency, tax_rate_bp, subtotal_minor, tax_minor, total_minor, amount_paid_minor, issue_date, due_date, period_start, period_end, sent_at, paid_at, payment_method, provider_synced_at)
      select x.company_id, x.customer_id, x.contract_id, x.source::invoice_source, x.key, (case when x.issue < $2::date - 45 then 'paid' else 'open' end)::invoice_status, 'USD', 725, x.price,
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

main().catch((err) => {
  say(err.stack || err.message)
  process.exitCode = 1
})
