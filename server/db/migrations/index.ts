import type { Migration } from 'kysely'
import * as m0001 from './0001_foundation'
import * as m0002 from './0002_artworks'

// A static list: a bundled server cannot read a folder of migration files.
// Add new migrations here, in order, under a name that sorts after the last one.
export const migrations: Record<string, Migration> = {
  '0001_foundation': m0001,
  '0002_artworks': m0002,
}
