import { useDb } from '#server/platform/db'
import { findJob } from '#server/jobs/queries'

// One layer of a layered job's decal, for the job page's order of application: whoever may see
// the job (an operator of any team in the program) may see the layers laid with it.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const job = authorize(actor, 'job.view', await findJob(db, actor, idParam(event)), 'No such job.')
  const layer = await layerOfRoute(event, db, job.revision_id)
  return sendStoredFile(event, { key: layer.vector_key, type: 'image/svg+xml', name: `${layerFileBase(job.title, job.revision_number, layer)}.svg` })
})
