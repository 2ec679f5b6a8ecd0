import { pageQuery } from '../../../../shared/schemas/common'
import { listCaughtMail } from '../../../services/mail'

// The local mail catcher's mailbox (development only: 404 unless RILLBOOK_MAIL_DIR is set).
const query = pageQuery.omit({ q: true })

export default defineEventHandler(async (event) => {
  await requireUser(event, { roles: ['owner'] })
  return listCaughtMail(queryAs(event, query))
})
