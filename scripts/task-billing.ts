// npm run task:billing — the billing job (billing:renew) by hand, against DATABASE_URL or the
// project's server. The payment settings (STRIPE_*) come from the environment as for the app.
//   --company <id>       only this company
//   --today YYYY-MM-DD   run as if today were this date (company-local)
//   --invoice-batch <n>  invoices (and overdue reminders) per transaction (default 500)
//   --crash-after <n>    kill this process abruptly after n units of work (the crash-safety test)
import { parseArgs } from 'node:util'
import { runBilling } from '../server/services/billing-run'
import { closeDb } from '../server/utils/db'

const { values } = parseArgs({ options: { 'company': { type: 'string' }, 'today': { type: 'string' }, 'invoice-batch': { type: 'string' }, 'crash-after': { type: 'string' } } })
const crashAfter = values['crash-after'] ? Number(values['crash-after']) : null

runBilling({
  companyId: values.company,
  today: values.today,
  invoiceBatch: values['invoice-batch'] ? Number(values['invoice-batch']) : undefined,
  onUnit: crashAfter ? (n) => { if (n >= crashAfter) process.kill(process.pid, 'SIGKILL') } : undefined,
}).then(async (r) => {
  console.log(JSON.stringify(r))
  await closeDb()
}, async (err) => {
  console.error(`[billing] ${err.stack || err.message}`)
  process.exitCode = 1
  await closeDb()
})
