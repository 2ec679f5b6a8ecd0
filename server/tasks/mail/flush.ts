import { flushOutbox } from '../../services/mail'

// Every instance runs this each minute; the claim's lease in flushOutbox() keeps them apart.
export default defineTask({
  meta: {
    name: 'mail:flush',
    description: 'Send the e-mails waiting in the outbox (retries with backoff)',
  },
  run: async () => ({ result: await flushOutbox() }),
})
