import { runAlertScan } from '../../services/alerts'
import { flushOutbox } from '../../services/mail'

export default defineTask({
  meta: { name: 'alerts:scan', description: 'Raise, update and close water, visit, equipment and renewal alerts' },
  async run() {
    const result = await runAlertScan()
    await flushOutbox()
    return { result }
  },
})
