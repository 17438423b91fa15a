import { useDb } from '#server/platform/db'
import { findRobot } from '#server/robots/queries'
import { queueEventKit } from '#server/plates/robot-check'

// One click before an event: spares of every plate on the robot and of every decal marked as
// needed at events, queued together as one batch per film.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const robot = authorize(actor, 'placement.reprint', await findRobot(db, actor, idParam(event)), 'No such robot.')
  const kit = await idempotent(event, actor, () => queueEventKit(db, actor, robot))
  setResponseStatus(event, 201)
  return kit
})
