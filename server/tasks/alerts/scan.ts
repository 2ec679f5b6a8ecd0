import { runAlertScan } from '../../services/alerts'
import { flushOutbox } from '../../services/mail'
import { useDb } from '../../utils/db'
import { claimScheduleSlot } from '../../utils/schedule-slot'

/** The schedule's period (nuxt.config.ts: every ten minutes). */
const PERIOD_MS = 10 * 60_000

// Every worker of every instance fires this; the first to claim the firing runs the scan (whose
// advisory lock also keeps it from overlapping a scan started by hand).
export default defineTask({
  meta: { name: 'alerts:scan', description: 'Raise, update and close water, visit, equipment and renewal alerts' },
  async run() {
    if (!(await claimScheduleSlot(useDb(), 'alerts:scan', PERIOD_MS))) return { result: { skipped: true } }
    const result = await runAlertScan()
    await flushOutbox()
    return { result }
  },
})
