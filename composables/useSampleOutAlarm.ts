// When a sample has been out of the freezer for the policy's limit, the phone says so (useTimedNotice): a
// notification with vibration where allowed, and always the on-screen alarm (`due`).
export function useSampleOutAlarm() {
  const notice = useTimedNotice()
  /** Sets the alarm for a sample taken out at `outAt`. */
  function arm(outAt: string, minutes: number, bagCode: string) {
    notice.arm(Date.parse(outAt) + minutes * 60_000, { title: `Sample ${bagCode}: ${minutes} minutes out`, body: 'Put it back in the freezer now.', tag: `sample-out-${bagCode}` })
  }
  return { due: notice.due, permission: notice.permission, ask: notice.ask, arm, disarm: notice.disarm }
}
