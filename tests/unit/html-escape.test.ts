import { describe, expect, it } from 'vitest'
import { escapeHtml } from '../../shared/text/html'

describe('escaping text for HTML', () => {
  it('writes the five characters that end content or a quoted attribute as entities (HTML Living Standard, named character references)', () => {
    expect(escapeHtml(`<a href="x" title='y'>Tom & Jerry</a>`))
      .toBe('&lt;a href=&quot;x&quot; title=&#39;y&#39;&gt;Tom &amp; Jerry&lt;/a&gt;')
  })

  it('escapes an ampersand once, so an entity already in the text is shown as written', () => {
    expect(escapeHtml('&amp; 5 > 3')).toBe('&amp;amp; 5 &gt; 3')
  })

  it('leaves other text, accents and emoji as they are', () => {
    expect(escapeHtml('Café 427 — 540 hp 🏁')).toBe('Café 427 — 540 hp 🏁')
  })
})
