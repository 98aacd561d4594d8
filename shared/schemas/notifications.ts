import { z } from 'zod'
import { EMAIL_GROUPS, NOTIFICATIONS_PER_PAGE, type EmailGroup } from '../deals/notifications'
import { idSchema, paginationQuery } from './common'

/** GET /api/me/notifications: the page and its size (at most 100). */
export const notificationsQuery = z.object({
  page: paginationQuery.shape.page,
  perPage: z.coerce.number().int('perPage is a whole number').min(1, 'perPage is at least 1').max(100, 'perPage is at most 100').default(NOTIFICATIONS_PER_PAGE),
})

/** POST /api/me/notifications/read: everything, or every event up to and including one id. */
export const notificationsRead = z.union([
  z.strictObject({ all: z.literal(true, { error: 'all is true' }) }),
  z.strictObject({ upTo: idSchema }),
], { error: 'Send { "all": true } or { "upTo": <event id> }' })

const onOff = z.boolean({ error: 'Each switch is true or false' }).optional()

/** PATCH /api/me/notifications/settings: the e-mail switches to change, by group (true = e-mail me). */
export const notificationSettingsPatch = z.strictObject({
  email: z.strictObject(Object.fromEntries(EMAIL_GROUPS.map(g => [g, onOff])) as Record<EmailGroup, typeof onOff>)
    .refine(v => Object.values(v).some(x => x !== undefined), 'Switch at least one kind of e-mail on or off'),
})

export type NotificationsQuery = z.infer<typeof notificationsQuery>
export type NotificationsRead = z.infer<typeof notificationsRead>
export type NotificationSettingsPatch = z.infer<typeof notificationSettingsPatch>
