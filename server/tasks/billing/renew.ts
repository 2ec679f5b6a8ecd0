import { runBilling } from '../../services/billing-run'
import { flushOutbox } from '../../services/mail'
import { useDb } from '../../utils/db'
import { claimScheduleSlot } from '../../utils/schedule-slot'

/** The schedule's period (nuxt.config.ts: daily, 11:15 UTC). */
const PERIOD_MS = 24 * 3600_000

// Daily on every worker of every instance; the first to claim the day's firing runs the job (the
// advisory lock in runBilling() also keeps it from overlapping a run started by hand).
export default defineTask({
  meta: { name: 'billing:renew', description: 'Renew terms, raise due invoices, sync the payment provider, send overdue reminders' },
  async run() {
    if (!(await claimScheduleSlot(useDb(), 'billing:renew', PERIOD_MS))) return { result: { skipped: true } }
    const result = await runBilling()
    await flushOutbox()
    return { result }
  },
})
