import { seedId } from '../../scripts/lib/seed-data'

// The demo sign-ins the tests use (see README "Demo sign-ins").
export const ADMIN = 'admin@forescent.test'
export const TRAINER_A = 'trainer@forescent.test'
export const TRAINER_B = 'trainer2@forescent.test'
export const HANDLER_A = 'handler@forescent.test'
export const HANDLER_B = 'handler2@forescent.test'

// Client A belongs to TRAINER_A with HANDLER_A; client B to TRAINER_B with HANDLER_B.
export const CLIENT_A = seedId('client:fairweather')
export const CLIENT_B = seedId('client:achterberg')
export const TRAINER3_ID = seedId('user:trainer3')
export const TRAINER_A_ID = seedId('user:trainer')
export const HANDLER_A_ID = seedId('user:handler')
export const TRAINER_B_ID = seedId('user:trainer2')
