// The same scrypt hasher nuxt-auth-utils uses at run time (its default options), for scripts outside Nitro.
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'

const hasher = new Hash(new Scrypt({}))
export const hashPassword = (plain: string) => hasher.make(plain)
