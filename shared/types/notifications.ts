import type { EmailGroup } from '../deals/notifications'

/** One deal event as the notifications page shows it. */
export interface NotificationView {
  id: number
  action: string
  words: string
  detail: string
  actorName: string | null
  title: string
  /** The order's page when the deal has an order, else the request's. */
  link: string
  createdAt: string
  unread: boolean
}

export interface NotificationList {
  notifications: NotificationView[]
  page: number
  perPage: number
  total: number
  unread: number
  /** True = this kind of deal e-mail is sent. */
  email: Record<EmailGroup, boolean>
}
