// Versions of the outline engines, recorded with every revision so a result can be explained
// later. Read at run time from the installed packages (the server and the worker bundle keep
// potrace external, so its package.json is next to it).
import { createRequire } from 'node:module'
import { VERSION as svgoVersion } from 'svgo'

const require = createRequire(import.meta.url)

export const ENGINE_VERSIONS_BASE = {
  potrace: (require('potrace/package.json') as { version: string }).version,
  svgo: svgoVersion as string,
}
