// The time zones a screen shows times in: the viewer's own (from their account) and the business's.
export function useZones(businessZone: MaybeRefOrGetter<string | undefined>) {
  const { user } = useUserSession()
  const business = computed(() => toValue(businessZone) ?? 'Europe/London')
  const viewer = computed(() => user.value?.timeZone ?? business.value)
  return { viewer, business }
}
