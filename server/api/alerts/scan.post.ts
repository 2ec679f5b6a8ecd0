import { runAlertScan } from '../../services/alerts'
import { flushOutbox } from '../../services/mail'

// Runs the alert scan now (it also runs on its schedule); safe next to a running one.
export default defineEventHandler(async (event) => {
  await requireUser(event, { roles: ['owner'] })
  const result = await runAlertScan()
  void flushOutbox().catch(() => {})
  return result
})
