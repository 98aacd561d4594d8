import { Auth } from '@auth/core'
import { authOptions } from '../../auth/options'

/**
 * Every sign-in route (/api/auth/session, csrf, providers, callback/<provider>, signout): the request
 * is handed to @auth/core as a web Request. The pages use sidebase nuxt-auth's `authjs` client.
 */
export default defineEventHandler(async (event) => {
  const origin = authOrigin(event)
  const url = new URL(event.path, origin.origin)
  const headers = new Headers()
  for (const [name, value] of event.headers) {
    if (name !== 'content-length' && name !== 'host') headers.set(name, value)
  }
  headers.set('host', url.host)
  let body: string | undefined
  if (event.method !== 'GET' && event.method !== 'HEAD') {
    body = (await readRawBody(event, 'utf8')) ?? ''
    // The client asks for `{ url }` instead of a redirect by sending json=true.
    if (new URLSearchParams(body).get('json') === 'true') headers.set('X-Auth-Return-Redirect', '1')
  }
  return Auth(new Request(url, { method: event.method, headers, body }), authOptions(event))
})
