import { applyPaymentEvent } from '../../services/invoice-payments'
import { verifyWebhook } from '../../utils/payments'

// The payment provider's events. Public, but nothing happens without a valid signature; each
// event id is applied once (a repeat is acknowledged and ignored).
export default defineEventHandler(async (event) => {
  const signature = getHeader(event, 'stripe-signature')
  if (!signature) throw httpError(400, 'Invalid header: stripe-signature — missing')
  // Counted as it arrives: past the raw-body limit is a 413 before anything is verified.
  const payload = (await readLimitedBody(event))?.toString('utf8') ?? ''
  let verified
  try {
    verified = verifyWebhook(payload, signature)
  }
  catch {
    throw httpError(400, 'Invalid header: stripe-signature — the signature does not match this payload')
  }
  const result = await applyPaymentEvent(verified)
  return { received: true, ...result }
})
