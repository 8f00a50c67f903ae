import { describe, expect, it } from 'vitest'
import { describeActivity } from '../../shared/utils/activity'

const base = { entityType: 'client', actorName: 'Maren Holt' }

describe('describeActivity', () => {
  it('names the changed fields in plain words', () => {
    expect(describeActivity({ ...base, action: 'client.updated', data: { fields: ['phone', 'town'] } })).toBe('Maren Holt updated the phone and town')
    expect(describeActivity({ ...base, action: 'client.updated', data: { fields: ['phone', 'town', 'earlySigns'] } })).toBe('Maren Holt updated the phone, town and early signs')
  })
  it('shows a stage change with its direction', () => {
    expect(describeActivity({ ...base, action: 'client.updated', data: { fields: ['status'], from: 'intake', to: 'active' } })).toBe('Maren Holt updated the stage (stage: intake → active)')
  })
  it('describes invitations, removals and reassignments', () => {
    expect(describeActivity({ ...base, action: 'invitation.created', data: { name: 'Kit Rivers', role: 'handler' } })).toBe('Maren Holt invited Kit Rivers as handler')
    expect(describeActivity({ ...base, action: 'handler.removed', data: { name: 'Kit Rivers' } })).toBe('Maren Holt removed Kit Rivers from the file')
    expect(describeActivity({ ...base, action: 'client.reassigned', actorName: 'Elspeth Varga', data: { from: 'Maren Holt', to: 'Ines Okoro' } })).toBe('Elspeth Varga moved the file from Maren Holt to Ines Okoro')
  })
  it('falls back to a readable line for other actions, and copes with no actor', () => {
    expect(describeActivity({ entityType: 'document', actorName: null, action: 'document.deleted', data: { title: 'Consent form' } })).toBe('Someone deleted document: Consent form')
    expect(describeActivity({ ...base, entityType: 'dog', action: 'dog.photo.added', data: { name: 'Juniper' } })).toBe('Maren Holt added dog photo: Juniper')
    expect(describeActivity({ ...base, entityType: 'document', action: 'document.updated', data: { from: { title: 'Scan 1' }, to: { title: 'Vaccination card' } } })).toBe('Maren Holt updated document: Vaccination card')
  })
  it('reads every action key as a sentence, never as a raw key', () => {
    expect(describeActivity({ ...base, entityType: 'homework', action: 'homework.video_uploaded', data: { title: 'Two controls' } })).toBe('Maren Holt sent a homework video: Two controls')
    expect(describeActivity({ ...base, entityType: 'thing', action: 'thing.made_ready', data: null })).toBe('Maren Holt made ready thing')
    for (const action of ['sample.used', 'training-session.logged', 'invoice.payment-recorded', 'x.some_new_event']) {
      expect(describeActivity({ ...base, action, data: null })).not.toMatch(/[_.]/)
    }
  })
})
