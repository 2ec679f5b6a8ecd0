export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  return { id: user.id, email: user.email, name: user.name, role: user.role, customerId: user.customerId }
})
