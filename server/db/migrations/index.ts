import type { Migration } from 'kysely'
import * as m0001 from './0001_foundation'
import * as m0002 from './0002_artworks'
import * as m0003 from './0003_review_film_placements'
import * as m0004 from './0004_laser_work_area'
import * as m0005 from './0005_structure'
import * as m0006 from './0006_trust'
import * as m0007 from './0007_requests'
import * as m0008 from './0008_films'
import * as m0009 from './0009_cleanup'
import * as m0010 from './0010_batches'
import * as m0011 from './0011_plates'
import * as m0012 from './0012_work'
import * as m0013 from './0013_layers'
import * as m0014 from './0014_cut_sheet_work'
import * as m0015 from './0015_event_kit'

// A static list: a bundled server cannot read a folder of migration files.
// Add new migrations here, in order, under a name that sorts after the last one.
export const migrations: Record<string, Migration> = {
  '0001_foundation': m0001,
  '0002_artworks': m0002,
  '0003_review_film_placements': m0003,
  '0004_laser_work_area': m0004,
  '0005_structure': m0005,
  '0006_trust': m0006,
  '0007_requests': m0007,
  '0008_films': m0008,
  '0009_cleanup': m0009,
  '0010_batches': m0010,
  '0011_plates': m0011,
  '0012_work': m0012,
  '0013_layers': m0013,
  '0014_cut_sheet_work': m0014,
  '0015_event_kit': m0015,
}
