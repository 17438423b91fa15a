// The same scrypt hashing that nuxt-auth-utils uses (its hashPassword wraps @adonisjs/hash's
// scrypt driver with default options), for code that runs outside the Nuxt server:
// the demo loader and the create-mentor command.
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'

const hash = new Hash(new Scrypt({}))

export function hashPasswordOutsideNuxt(password: string): Promise<string> {
  return hash.make(password)
}
