import { runBilling } from '../../services/billing-run'
import { flushOutbox } from '../../services/mail'

// Daily on every instance; the advisory lock in runBilling() lets one of them do the work.
export default defineTask({
  meta: { name: 'billing:renew', description: 'Renew terms, raise due invoices, sync the payment provider, send overdue reminders' },
  async run() {
    const result = await runBilling()
    await flushOutbox()
    return { result }
  },
})
