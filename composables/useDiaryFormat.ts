// Dates and times of the alert diary, on the signed-in person's time zone (the same on the server render and in the browser).
import { formatDuration } from '~/shared/utils/alerts'
import { knownTimeZone } from '~/shared/utils/diary'

export function useDiaryFormat() {
  const { user } = useUserSession()
  const timeZone = computed(() => knownTimeZone(user.value?.timeZone))
  const fmt = (opts: Intl.DateTimeFormatOptions) => computed(() => new Intl.DateTimeFormat('en-GB', { ...opts, timeZone: timeZone.value }))
  const timeFmt = fmt({ hour: '2-digit', minute: '2-digit' })
  const dayFmt = fmt({ weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' })
  const dateTimeFmt = fmt({ day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit' })
  const monthFmt = fmt({ month: 'short', year: 'numeric' })
  return {
    timeZone,
    time: (d: string | Date) => timeFmt.value.format(new Date(d)),
    day: (d: string | Date) => dayFmt.value.format(new Date(d)),
    dateTime: (d: string | Date) => dateTimeFmt.value.format(new Date(d)),
    /** "2026-09" → "Sep 2026" */
    month: (key: string) => monthFmt.value.format(new Date(`${key}-15T12:00:00Z`)),
    duration: (minutes: number) => formatDuration(minutes),
    share: (p: number) => `${Math.round(p * 100)}%`,
  }
}
