import { HOME_BY_ROLE, type Role } from '#shared/utils/roles'

// UX only: sends a signed-in user away from pages meant for other roles. The server decides access.
export default defineNuxtRouteMiddleware((to) => {
  const allowed = to.meta.roles as Role[] | undefined
  if (!allowed) return
  const { data, status } = useAuth()
  if (status.value !== 'authenticated' || !data.value) return
  const role = (data.value as { role: Role }).role
  if (!allowed.includes(role)) return navigateTo(HOME_BY_ROLE[role])
})

declare module '#app' {
  interface PageMeta {
    roles?: Role[]
  }
}
