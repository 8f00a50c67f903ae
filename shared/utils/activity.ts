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
      // "dog.photo.added" → "added dog photo"
      const parts = e.action.split('.')
      const verb = parts.length > 1 ? parts.pop()! : 'changed'
      const thing = parts.join(' ') || e.entityType
      return `${who} ${verb.replace(/-/g, ' ')} ${thing.replace(/-/g, ' ')}${str(d.title) ? `: ${str(d.title)}` : str(d.name) ? `: ${str(d.name)}` : ''}`
    }
  }
}
