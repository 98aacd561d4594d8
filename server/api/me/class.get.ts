import { getClassRules } from '../../services/class-rules'

/** The racer's class rules ({ rules: null } when none are saved). Racers only: a shop or an admin gets 403. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'racer')
  return { rules: await getClassRules(useDb(), user.id) }
})
