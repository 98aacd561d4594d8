import { classRulesSchema } from '#shared/schemas/class-rules'
import { saveClassRules } from '../../services/class-rules'

/** Saves the racer's class rules (the whole set each time). Racers only: a shop or an admin gets 403. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'racer')
  const rules = await readValidatedBody(event, validator(classRulesSchema))
  return { rules: await saveClassRules(useDb(), user.id, rules) }
})
