import { createServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { $fetch } from 'ofetch'
import { apiError, apiErrorMessage } from '../../utils/api-error'

// A small server answering the JSON bodies h3 writes for createError({ status, message, data }).
let server: Server
let base = ''

beforeAll(async () => {
  server = createServer((req, res) => {
    res.setHeader('content-type', 'application/json')
    if (req.url === '/refused') {
      res.statusCode = 403
      res.end(JSON.stringify({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the shop can do that.' }))
    }
    else if (req.url === '/invalid') {
      res.statusCode = 400
      res.end(JSON.stringify({
        statusCode: 400,
        statusMessage: 'Bad Request',
        message: 'Check the highlighted fields.',
        data: { data: { issues: [
          { path: 'title', message: 'Give the build a title.' },
          { path: 'title', message: 'A second title complaint.' },
          { path: 'parts.0.name', message: 'Name each part.' },
          { path: '', message: 'The form as a whole is wrong.' },
        ] } },
      }))
    }
    else {
      res.statusCode = 502
      res.end('not json at all')
    }
  })
  await new Promise<void>(done => server.listen(0, '127.0.0.1', done))
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
})

afterAll(() => new Promise<void>(done => server.close(() => done())))

async function failure(url: string): Promise<unknown> {
  try {
    await $fetch(url, { retry: 0 })
  }
  catch (err) {
    return err
  }
  throw new Error(`${url} answered without failing`)
}

describe('reading a failed API call', () => {
  it('takes the status and the route\'s own message from a FetchError', async () => {
    const err = await failure(`${base}/refused`)
    expect((err as Error).name).toBe('FetchError')
    expect(apiError(err)).toEqual({ status: 403, message: 'Only the shop can do that.', fields: {} })
    expect(apiErrorMessage(err, 'fallback')).toBe('Only the shop can do that.')
  })

  it('maps validator issues nested in data.data to the first message per top-level field', async () => {
    const err = await failure(`${base}/invalid`)
    const read = apiError(err)
    expect(read.status).toBe(400)
    expect(read.message).toBe('Check the highlighted fields.')
    expect(read.fields).toEqual({
      title: 'Give the build a title.',
      parts: 'Name each part.',
      _form: 'The form as a whole is wrong.',
    })
  })

  it('never shows ofetch\'s technical line when the answer carries no message', async () => {
    const err = await failure(`${base}/garbled`)
    expect((err as Error).message).toContain('502')
    expect(apiError(err)).toEqual({ status: 502, message: undefined, fields: {} })
    expect(apiErrorMessage(err, 'The pull could not be deleted.')).toBe('The pull could not be deleted.')
  })

  it('gives no status and the fallback for a network failure with no answer', async () => {
    const closed = createServer()
    await new Promise<void>(done => closed.listen(0, '127.0.0.1', done))
    const port = (closed.address() as AddressInfo).port
    await new Promise<void>(done => closed.close(() => done()))
    const err = await failure(`http://127.0.0.1:${port}/gone`)
    expect((err as Error).message).toContain('<no response>')
    expect(apiError(err)).toEqual({ status: undefined, message: undefined, fields: {} })
    expect(apiErrorMessage(err)).toBe('Something went wrong: try again.')
  })

  it('shows a plain Error\'s own message, and reads a thrown non-error as nothing', () => {
    expect(apiError(new Error('Choose a file first.'))).toEqual({ status: undefined, message: 'Choose a file first.', fields: {} })
    expect(apiErrorMessage('a string', 'fallback')).toBe('fallback')
    expect(apiError(undefined)).toEqual({ fields: {} })
  })

  it('reads a NuxtError-like object revived from the page payload', () => {
    const revived = { statusCode: 404, statusMessage: 'Not Found', message: 'No dispute has that id.', data: { message: 'No dispute has that id.' } }
    expect(apiError(revived)).toEqual({ status: 404, message: 'No dispute has that id.', fields: {} })
    const copied = Object.assign(new Error('[GET] "/api/me/builds/9": 502 Bad Gateway'), { statusCode: 502 })
    expect(apiError(copied)).toEqual({ status: 502, message: undefined, fields: {} })
  })
})
