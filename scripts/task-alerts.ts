// npm run task:alerts — the alert scan by hand, against DATABASE_URL or the project's server.
import { runAlertScan } from '../server/services/alerts'
import { closeDb } from '../server/utils/db'

runAlertScan().then(async (r) => {
  console.log(JSON.stringify(r))
  await closeDb()
}, async (err) => {
  console.error(`[alerts] ${err.stack || err.message}`)
  process.exitCode = 1
  await closeDb()
})
