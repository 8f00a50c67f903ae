import type { AppointmentKind, AppointmentStatus } from '../utils/schedule'

/** An appointment as the API answers it (dates as ISO strings once serialised). */
export interface AppointmentShown {
  id: string
  seriesId: string | null
  clientId: string
  trainerId: string
  dogId: string | null
  kind: AppointmentKind
  kindLabel: string
  startsAt: string
  endsAt: string
  originalStartsAt: string
  durationMinutes: number
  timeZone: string
  place: string | null
  householdNotes: string | null
  privateNotes?: string | null
  status: AppointmentStatus
  cancelReason: string | null
  sequence: number
  householdName: string
  dogName: string | null
  trainerName: string
  repeats: boolean
}
