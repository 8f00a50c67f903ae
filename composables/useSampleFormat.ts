// Dates of the sample bank in the signed-in person's time zone (the same on the server render and in the browser).
export function useSampleFormat() {
  const { user } = useUserSession()
  const timeZone = computed(() => user.value?.timeZone || 'Europe/London')
  return {
    timeZone,
    day: (v: string | Date | null | undefined) => formatInstant(v, 'day', timeZone.value),
    dayTime: (v: string | Date | null | undefined) => formatInstant(v, 'day-time', timeZone.value),
    ageDays: (v: string | Date, now: string | Date) => Math.max(0, Math.floor((new Date(now).getTime() - new Date(v).getTime()) / 86_400_000)),
  }
}

/** A Date as the value of an <input type="datetime-local"> in the given time zone. */
export function toLocalInput(d: Date, timeZone: string): string {
  const parts = Object.fromEntries(new Intl.DateTimeFormat('en-GB', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' })
    .formatToParts(d).map(p => [p.type, p.value]))
  return `${parts.year}-${parts.month}-${parts.day}T${parts.hour}:${parts.minute}`
}

/** An <input type="datetime-local"> value read in the given time zone, as an ISO instant (null when empty or invalid). */
export function fromLocalInput(value: string, timeZone: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(value)
  if (!m) return null
  const asUtc = Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!, +m[4]!, +m[5]!)
  // The zone's offset at that moment, found by formatting the UTC guess back in the zone (twice for DST edges).
  let t = asUtc
  for (let i = 0; i < 2; i++) {
    const shown = toLocalInput(new Date(t), timeZone)
    const s = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(shown)!
    const shownUtc = Date.UTC(+s[1]!, +s[2]! - 1, +s[3]!, +s[4]!, +s[5]!)
    t += asUtc - shownUtc
  }
  return new Date(t).toISOString()
}
