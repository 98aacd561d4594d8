// The product's words come from one place (shared/vocabulary.ts): an admin's verification and the
// automatic checks never share a word, no screen or e-mail writes them itself, and the phrasings they
// replaced do not come back.
import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join, relative } from 'node:path'
import { describe, expect, it } from 'vitest'
import { AUTO_CHECKS, PULL_STATUS_WORDS, RETIRED_PHRASES, VERIFICATION } from '../../shared/vocabulary'

const ROOT = join(__dirname, '..', '..')
const SCANNED = ['components', 'pages', 'layouts', 'composables', 'utils', 'server', 'error.vue', 'app.vue']
const SKIPPED = [join('server', 'database', 'migrations')]

/** Every source file the pages and e-mails are made of, with its text. */
function sources(): { path: string, text: string }[] {
  const out: { path: string, text: string }[] = []
  const walk = (path: string) => {
    const rel = relative(ROOT, path)
    if (SKIPPED.some(s => rel.startsWith(s))) return
    if (statSync(path).isDirectory()) return readdirSync(path).forEach(name => walk(join(path, name)))
    if (/\.(vue|ts)$/.test(path)) out.push({ path: rel, text: readFileSync(path, 'utf8') })
  }
  SCANNED.forEach(p => walk(join(ROOT, p)))
  return out
}

/** The words that must be written only in shared/vocabulary.ts, as they appear on screen. */
const OWNED = [
  VERIFICATION.awaiting, VERIFICATION.action, VERIFICATION.builds, VERIFICATION.queue, VERIFICATION.meaning,
  AUTO_CHECKS.name, AUTO_CHECKS.run, AUTO_CHECKS.outcome.warn,
  ...Object.values(AUTO_CHECKS.titles),
]

describe('one vocabulary', () => {
  const files = sources()

  it('scans the pages, the components and the server (e-mails included)', () => {
    const paths = files.map(f => f.path)
    expect(paths).toContain(join('server', 'services', 'mail-templates.ts'))
    expect(paths.filter(p => p.startsWith('components')).length).toBeGreaterThan(50)
  })

  it('keeps verification and the automatic checks apart: no word of one names the other', () => {
    const verification = [...Object.values(VERIFICATION), ...Object.values(PULL_STATUS_WORDS)].join(' ').toLowerCase()
    const checks = [AUTO_CHECKS.name, AUTO_CHECKS.run, ...Object.values(AUTO_CHECKS.outcome)].join(' ').toLowerCase()
    expect(checks).not.toMatch(/verif/)
    expect(verification).not.toMatch(/\bcheck/)
  })

  it('finds none of the retired phrasings anywhere', () => {
    const found = files.flatMap(f => RETIRED_PHRASES.filter(p => f.text.toLowerCase().includes(p.toLowerCase())).map(p => `${f.path}: "${p}"`))
    expect(found).toEqual([])
  })

  it('writes the shared words only in shared/vocabulary.ts', () => {
    const found = files.flatMap(f => OWNED.filter(w => f.text.includes(w)).map(w => `${f.path}: "${w}"`))
    expect(found).toEqual([])
    // The outcome words as literals (quoted), which is how a screen would spell its own.
    const literals = files.flatMap(f => [...f.text.matchAll(/['"`>](Pass|Passes|Fail|Fails|Look again|Look closer)['"`<]/g)].map(m => `${f.path}: ${m[0]}`))
    expect(literals).toEqual([])
  })

  it('is what the badges, the check reports and the admin\'s e-mail import', () => {
    const importers = ['components/build/BuildVerifiedMark.vue', 'components/build/BuildPullList.vue', 'components/editor/EditorPulls.vue', 'components/editor/EditorCheckReport.vue', 'components/admin/AdminOutcome.vue', 'components/admin/AdminDecisionForm.vue', 'utils/admin-format.ts', 'server/services/mail-templates.ts']
    for (const path of importers) expect(readFileSync(join(ROOT, path), 'utf8'), path).toMatch(/from '(#shared|\.\.\/\.\.\/shared)\/vocabulary'/)
  })
})
