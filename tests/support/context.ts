import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import { inject } from 'vitest'
import * as schema from '../../server/database/schema'
import type { CaughtMail } from './mail-catcher'

/** The running app's base URL, from the global setup. */
export const baseUrl = () => inject('baseUrl')

/** A fetch against the running app that never throws on 4xx/5xx, so tests can assert statuses. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- tests read whatever JSON a route answers
export async function api(path: string, init: RequestInit = {}): Promise<{ status: number, body: any, headers: Headers }> {
  const res = await fetch(`${baseUrl()}${path}`, { redirect: 'manual', ...init })
  const text = await res.text()
  let body: unknown = text
  try {
    body = text ? JSON.parse(text) : null
  }
  catch {
    // Not JSON: keep the text.
  }
  return { status: res.status, body, headers: res.headers }
}

/** A direct connection to the test database, for checking what a route wrote. */
export async function testDb() {
  const connection = await mysql.createConnection({ uri: inject('databaseUrl'), timezone: 'Z' })
  return { db: drizzle(connection, { schema, mode: 'default' }), close: () => connection.end() }
}

/** Messages the mail catcher received, optionally for one address. */
export async function mailFor(address?: string): Promise<CaughtMail[]> {
  const url = new URL(inject('mailApiUrl'))
  if (address) url.searchParams.set('to', address)
  return (await fetch(url)).json() as Promise<CaughtMail[]>
}

export { schema }
