import type { Role } from '#shared/utils/roles'

export interface CurrentUser {
  id: string
  email: string
  name: string
  role: Role
  customerId: string | null
}

/** The signed-in user from nuxt-auth's session (UX only: the server checks every request). */
export function useCurrentUser() {
  const { data, status } = useAuth()
  const user = computed(() => (status.value === 'authenticated' ? (data.value as CurrentUser | null) : null))
  return { user, status }
}
