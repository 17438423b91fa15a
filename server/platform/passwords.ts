// Scrypt password hashes, the same as nuxt-auth-utils makes (its hashPassword wraps
// @adonisjs/hash's scrypt driver with default options), usable in the server, the scripts
// and the tests alike.
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'

const hash = new Hash(new Scrypt({}))

export function hashPassword(password: string): Promise<string> {
  return hash.make(password)
}

export function verifyPassword(hashed: string, password: string): Promise<boolean> {
  return hash.verify(hashed, password)
}
