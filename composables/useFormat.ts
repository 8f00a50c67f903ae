// The presentation kit for screens (shared/utils/format.ts) with the signed-in person's time zone filled in, so the
// server render and the browser show the same words.
import type { DayStyle, InstantStyle } from '~/shared/utils/format'

export function useFormat() {
  const { user } = useUserSession()
  const timeZone = computed(() => user.value?.timeZone || DEFAULT_TIME_ZONE)
  return {
    timeZone,
    /** A calendar day ('2026-07-13'), the same for every viewer. */
    day: (day: string | null | undefined, style: DayStyle = 'medium') => formatDay(day, style),
    /** An instant in the viewer's zone. */
    instant: (v: string | Date | number | null | undefined, style: InstantStyle = 'medium') => formatInstant(v, style, timeZone.value),
  }
}
