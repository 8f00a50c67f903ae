// Plain-language lines for the client's activity timeline, from audit-log entries.
export interface ActivityEntry {
  action: string
  entityType: string
  data: Record<string, unknown> | null
  actorName: string | null
}

const FIELD_LABELS: Record<string, string> = {
  householdName: 'household name', personName: 'person', email: 'e-mail', phone: 'phone', addressLine: 'address',
  town: 'town', postcode: 'postcode', condition: 'condition', conditionDetail: 'condition detail',
  clinicianName: 'clinician', clinicianContact: "clinician's contact", earlySigns: 'early signs',
  episodeFrequency: 'episode frequency', usualOnset: 'usual onset', notes: 'notes', status: 'stage',
  programmeStartedOn: 'programme start',
}

function list(items: string[]): string {
  if (items.length <= 1) return items.join('')
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`
}

// Actions whose words do not follow "<thing>.<verb>" (as they read in the timeline).
const ACTION_PHRASES: Record<string, string> = {
  'homework.video_uploaded': 'sent a homework video',
  'homework.assigned': 'set homework',
  'homework.reviewed': 'reviewed homework',
  'homework.completed': 'marked homework done',
  'homework-comment.added': 'commented on homework',
  'training-session.logged': 'logged a training session',
  'training-trial.deleted': 'removed a trial',
  'suitability-assessment.recorded': 'recorded a suitability assessment',
  'dog-status.recorded': "changed the dog's status",
  'sample.used': 'took a sample out for training',
  'sample.returned': 'put a sample back',
  'sample.stored': 'stored a sample',
  'sample.discarded': 'discarded a sample',
  'sample.answers-recorded': 'recorded the collection answers',
  'sample-outer-bag.moved': 'moved a bag of samples',
  'diary-alert.reviewed': 'reviewed an alert in the diary',
  'diary-window.set': 'set the diary window',
  'diary-window.cleared': 'cleared the diary window',
  'invoice.payment-recorded': 'recorded a payment',
  'invoice.plan-created': 'planned the instalments',
  'milestone.confirmed': 'signed off a milestone',
  'milestone.criteria-set': "set a milestone's criteria",
  'milestone.text-edited': "edited a milestone's wording",
  'appointment.booked': 'booked a visit',
  'appointment.changed': 'changed a visit',
  'appointment.cancelled': 'cancelled a visit',
  'message.sent': 'sent a message',
}

const str = (v: unknown) => (typeof v === 'string' ? v : '')

/** "Maren Holt updated the phone and town", or a readable fallback for actions it does not know. */
export function describeActivity(e: ActivityEntry): string {
  const who = e.actorName ?? 'Someone'
  const d = e.data ?? {}
  switch (e.action) {
    case 'client.created': return `${who} opened the client file`
    case 'client.updated':
    case 'client.contact-updated': {
      const fields = Array.isArray(d.fields) ? (d.fields as string[]).map(f => FIELD_LABELS[f] ?? f) : []
      const stage = d.to ? ` (stage: ${str(d.from)} → ${str(d.to)})` : ''
      return `${who} updated the ${fields.length ? list(fields) : 'file'}${stage}`
    }
    case 'invitation.created': return `${who} invited ${str(d.name) || str(d.email)} as ${str(d.role) || 'handler'}`
    case 'invitation.accepted': return `${who} accepted the invitation and joined`
    case 'handler.removed': return `${who} removed ${str(d.name) || 'a handler'} from the file`
    case 'client.reassigned': return `${who} moved the file from ${str(d.from) || 'the previous trainer'} to ${str(d.to)}`
    case 'document.updated': {
      const to = (d.to ?? {}) as Record<string, unknown>
      return `${who} updated document${str(to.title) ? `: ${str(to.title)}` : ''}`
    }
    default: {
      const phrase = ACTION_PHRASES[e.action]
      const about = str(d.title) ? `: ${str(d.title)}` : str(d.name) ? `: ${str(d.name)}` : ''
      if (phrase) return `${who} ${phrase}${about}`
      // "dog.photo.added" → "added dog photo"; "homework.video_uploaded" → "video uploaded homework" never: the last
      // part is the verb, and underscores and hyphens read as spaces.
      const parts = e.action.replace(/_/g, '-').split('.')
      const verb = parts.length > 1 ? parts.pop()! : 'changed'
      const thing = parts.join(' ') || e.entityType
      return `${who} ${verb.replace(/-/g, ' ')} ${thing.replace(/-/g, ' ')}${about}`
    }
  }
}
