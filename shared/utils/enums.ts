// Enumerations shared by the database schema, the zod schemas and the pages.
export const ROLES = ['admin', 'trainer', 'handler'] as const
export type Role = (typeof ROLES)[number]

// Conditions a medical alert dog is commonly trained for (common practice).
export const CONDITIONS = ['migraine', 'hypoglycaemia', 'seizure', 'other'] as const
export type Condition = (typeof CONDITIONS)[number]
export const CONDITION_LABELS: Record<Condition, string> = {
  migraine: 'Migraine',
  hypoglycaemia: 'Hypoglycaemia (low blood sugar)',
  seizure: 'Seizures',
  other: 'Other',
}

export const CLIENT_STATUSES = ['intake', 'active', 'placed', 'aftercare', 'closed'] as const
export type ClientStatus = (typeof CLIENT_STATUSES)[number]

export const HANDLER_RELATIONSHIPS = ['self', 'parent', 'partner', 'carer', 'other'] as const
export type HandlerRelationship = (typeof HANDLER_RELATIONSHIPS)[number]

export const DOG_SEXES = ['female', 'male'] as const
export const DOG_SOURCES = ['own-dog', 'programme-bred', 'rescue'] as const
export const DOG_STATUSES = ['assessment', 'in-training', 'placed', 'retired', 'withdrawn'] as const

// Stages a scent-detection programme moves through (common practice). A sample use records the stage it served;
// under the single-use policy an imprinting use throws the sample away (shared/utils/samples.ts IMPRINTING_STAGE).
export const TRAINING_STAGES = ['imprinting', 'discrimination', 'alert', 'generalisation', 'maintenance'] as const
export type TrainingStage = (typeof TRAINING_STAGES)[number]
export const TRAINING_STAGE_LABELS: Record<TrainingStage, string> = {
  imprinting: 'Imprinting',
  discrimination: 'Discrimination',
  alert: 'Trained alert',
  generalisation: 'Generalisation',
  maintenance: 'Maintenance',
}
