import { idParam } from '../../../../shared/schemas/common'
import { contractActionSchema } from '../../../../shared/schemas/contracts'
import { actOnContract } from '../../../services/contracts'

// activate | pause | resume | end | cancel | renew — the contract's lifecycle; visits follow.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'contracts.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, contractActionSchema)
  return actOnContract(user, id, input, requestIp(event))
})
