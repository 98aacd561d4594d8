// The page cache's rules (server/utils/page-cache-rules.ts): which pages are stored under which key,
// the nonce's form, and the least-recently-used bounds.
import { describe, expect, it } from 'vitest'
import { NONCE_PLACEHOLDER, PageLru, freshNonce, pageCacheKey } from '../../server/utils/page-cache-rules'

const entry = (html: string, generation = 0, expires = 10_000) => ({ html, headers: {}, generation, expires })

describe('pageCacheKey', () => {
  it('stores the public pages and nothing else', () => {
    for (const url of ['/', '/builds/harrow-423-na', '/builders/harrow-creek-engine-works', '/search', '/search?q=x', '/tools', '/swaps']) {
      expect(pageCacheKey('h', url), url).not.toBeNull()
    }
    for (const url of ['/sign-in', '/account', '/dashboard', '/deals', '/compare?builds=a,b', '/builds/a/b', '/api/builds', '/track-record/x/on-time', '/admin']) {
      expect(pageCacheKey('h', url), url).toBeNull()
    }
  })

  it('keys the search page on its query with the parameters sorted by name, repeated ones kept in order', () => {
    const a = pageCacheKey('h', '/search?ciMin=400&ciMax=450&fuel=e85&fuel=methanol')!
    const b = pageCacheKey('h', '/search?fuel=e85&ciMax=450&fuel=methanol&ciMin=400')!
    expect(a.key).toBe(b.key)
    expect(pageCacheKey('h', '/search?fuel=methanol&fuel=e85')!.key).not.toBe(pageCacheKey('h', '/search?fuel=e85&fuel=methanol')!.key)
    expect(pageCacheKey('h', '/search?ciMin=401')!.key).not.toBe(pageCacheKey('h', '/search?ciMin=400')!.key)
    expect(pageCacheKey('h', '/search?')!.key).toBe(pageCacheKey('h', '/search')!.key)
    expect(pageCacheKey('h', `/search?q=${'x'.repeat(600)}`)).toBeNull()
  })

  it('does not store pages that ignore the query when one is given, keys on the host, and gives the shop page a shorter life', () => {
    expect(pageCacheKey('h', '/?utm_source=x')).toBeNull()
    expect(pageCacheKey('a', '/')!.key).not.toBe(pageCacheKey('b', '/')!.key)
    expect(pageCacheKey('h', '/builders/x')!.seconds).toBeLessThan(pageCacheKey('h', '/')!.seconds)
  })
})

describe('nonces', () => {
  it('makes a fresh nonce in nuxt-security\'s form (18 random bytes, base64) each time', () => {
    const seen = new Set(Array.from({ length: 50 }, () => freshNonce()))
    expect(seen.size).toBe(50)
    for (const n of seen) expect(n).toMatch(/^[A-Za-z0-9+/]{24}$/)
    expect(NONCE_PLACEHOLDER).toMatch(/^__tw_nonce_[0-9a-f]{24}__$/)
  })
})

describe('PageLru', () => {
  it('answers only the generation it was stored under, before it expires', () => {
    const lru = new PageLru()
    lru.set('k', entry('<p>a</p>', 3, 1000))
    expect(lru.get('k', 3, 999)?.html).toBe('<p>a</p>')
    expect(lru.get('k', 4, 999)).toBeUndefined()
    lru.set('k', entry('<p>a</p>', 3, 1000))
    expect(lru.get('k', 3, 1000)).toBeUndefined()
    expect(lru.size).toBe(0)
    expect(lru.storedBytes).toBe(0)
  })

  it('drops the least recently used entry past its entry or byte bound', () => {
    const byCount = new PageLru(2, 1_000_000)
    byCount.set('a', entry('a'))
    byCount.set('b', entry('b'))
    byCount.get('a', 0, 0)
    byCount.set('c', entry('c'))
    expect(byCount.get('b', 0, 0)).toBeUndefined()
    expect(byCount.get('a', 0, 0)?.html).toBe('a')
    expect(byCount.get('c', 0, 0)?.html).toBe('c')

    const byBytes = new PageLru(100, 10)
    byBytes.set('a', entry('12345'))
    byBytes.set('b', entry('12345'))
    byBytes.set('c', entry('é')) // two bytes in UTF-8
    expect(byBytes.get('a', 0, 0)).toBeUndefined()
    expect(byBytes.storedBytes).toBe(7)
    byBytes.set('huge', entry('x'.repeat(11)))
    expect(byBytes.get('huge', 0, 0)).toBeUndefined()
    expect(byBytes.size).toBe(2)
  })
})
