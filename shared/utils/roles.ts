import type { Role } from './enums'

export const ROLE_HOME: Record<Role, string> = { admin: '/admin', trainer: '/trainer', handler: '/handler' }
export const ROLE_LABEL: Record<Role, string> = { admin: 'Admin', trainer: 'Trainer', handler: 'Handler' }

/** Pages anyone may open without signing in. */
export const PUBLIC_PATHS = ['/login', '/forgot-password', '/reset-password', '/invitation']

export function isPublicPath(path: string): boolean {
  return PUBLIC_PATHS.some(p => path === p || path.startsWith(`${p}/`))
}

/** The role whose area a path belongs to, if any. */
export function areaOf(path: string): Role | null {
  const first = path.split('/')[1]
  return first === 'admin' || first === 'trainer' || first === 'handler' ? first : null
}

/** Where a client file opens for a role. */
export function clientPath(role: Role, id: string): string {
  return role === 'handler' ? `/handler/clients/${id}` : `${ROLE_HOME[role]}/clients/${id}`
}
