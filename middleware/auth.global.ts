// Navigation comfort only: the server checks every request on its own.
export default defineNuxtRouteMiddleware((to) => {
  const { loggedIn, user } = useUserSession()
  if (isPublicPath(to.path)) {
    if (loggedIn.value && user.value && to.path === '/login') return navigateTo(ROLE_HOME[user.value.role])
    return
  }
  if (!loggedIn.value || !user.value) {
    return navigateTo({ path: '/login', query: to.fullPath !== '/' ? { next: to.fullPath } : {} })
  }
  const area = areaOf(to.path)
  if (to.path === '/' || (area && area !== user.value.role)) return navigateTo(ROLE_HOME[user.value.role])
})
