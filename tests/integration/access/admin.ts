import { defineAccess } from '../../support/access'

/** Admin routes: anonymous visitors get 401, every other role 403, and admins the answer the sample asks for. */
const adminOnly = (status: number) => ({ anonymous: 401, racer: 403, shop: 403, admin: status })

// Samples never change a row: decisions go to a pull that does not exist or stop at validation (400).
// Pull 1 is the demo seed's first pull (verified, no dyno sheet) in the fresh test database.
export default defineAccess([
  { method: 'GET', path: '/api/admin/overview', expect: adminOnly(200) },

  { method: 'GET', path: '/api/admin/evidence', expect: adminOnly(200) },
  { method: 'GET', path: '/api/admin/evidence/1', expect: adminOnly(200) },
  { method: 'GET', path: '/api/admin/evidence/999999999', expect: adminOnly(404) },
  { method: 'GET', path: '/api/admin/evidence/not-a-number', expect: adminOnly(400) },
  { method: 'GET', path: '/api/admin/evidence/1/file', expect: adminOnly(200) },
  { method: 'GET', path: '/api/admin/evidence/1/sheet', expect: adminOnly(404) },
  { method: 'POST', path: '/api/admin/evidence/999999999/approve', body: {}, expect: adminOnly(404) },
  { method: 'POST', path: '/api/admin/evidence/1/approve', body: { note: 42 }, expect: adminOnly(400) },
  { method: 'POST', path: '/api/admin/evidence/1/reject', body: {}, expect: adminOnly(400) },
  { method: 'POST', path: '/api/admin/evidence/999999999/reject', body: { reason: 'The file is not the pull on the sheet.' }, expect: adminOnly(404) },

  { method: 'GET', path: '/api/admin/listings', expect: adminOnly(200) },
  { method: 'GET', path: '/api/admin/listings?status=hidden', expect: adminOnly(400) },
  { method: 'POST', path: '/api/admin/listings/1/unpublish', body: {}, expect: adminOnly(400) },
  { method: 'POST', path: '/api/admin/listings/999999999/unpublish', body: { reason: 'The photos belong to another shop.' }, expect: adminOnly(404) },

  // Milestone 1 is the demo order's first (awaiting its deposit, never disputed): its review is a 404 and settling it a 409.
  { method: 'GET', path: '/api/admin/disputes', expect: adminOnly(200) },
  { method: 'GET', path: '/api/admin/disputes/1', expect: adminOnly(404) },
  { method: 'GET', path: '/api/admin/disputes/999999999', expect: adminOnly(404) },
  { method: 'GET', path: '/api/admin/disputes/not-a-number', expect: adminOnly(400) },
  { method: 'POST', path: '/api/admin/disputes/1/settle', body: {}, expect: adminOnly(400) },
  { method: 'POST', path: '/api/admin/disputes/1/settle', body: { outcome: 'refund', note: 'x' }, expect: adminOnly(400) },
  { method: 'POST', path: '/api/admin/disputes/1/settle', body: { outcome: 'release', note: 'The invoices match the parts list.' }, expect: adminOnly(409) },
  { method: 'POST', path: '/api/admin/disputes/999999999/settle', body: { outcome: 'refund', note: 'No proof of the work was sent.' }, expect: adminOnly(404) },

  { method: 'GET', path: '/api/admin/audit', expect: adminOnly(200) },
  { method: 'GET', path: '/api/admin/audit?action=pull.verify&from=2026-01-01&to=2026-12-31', expect: adminOnly(200) },
  { method: 'GET', path: '/api/admin/audit?from=2026-13-01', expect: adminOnly(400) },
  { method: 'GET', path: '/api/admin/audit?from=2026-05-02&to=2026-05-01', expect: adminOnly(400) },
])
