/**
 * The product's shared words, in one place so every page, component and e-mail says the same thing.
 *
 * Two ideas must never share a word:
 * - an admin's **verification** of a pull (a person compared the raw dyno file with the listed figures):
 *   "Verified", "Awaiting verification", "Verify this pull";
 * - the **automatic checks**, the report the software writes on every uploaded pull:
 *   "Passes", "Worth a look", "Fails".
 * tests/unit/vocabulary.test.ts fails when one of these words is written anywhere else, or an old phrasing comes back.
 */

/** An admin's verification of a pull's evidence. */
export const VERIFICATION = {
  /** Badge on a build or pull an admin verified. */
  verified: 'Verified',
  /** Badge on a build or pull still waiting for an admin. */
  awaiting: 'Awaiting verification',
  /** Badge on a pull an admin turned down. */
  rejected: 'Not verified',
  /** The admin's action. */
  action: 'Verify this pull',
  /** What the verified mark means, for its tooltip and the help text. */
  meaning: 'An admin compared the raw dyno file with the listed figures',
  /** The count of a shop's verified builds. */
  builds: 'Verified builds',
  /** The admin's queue of pulls to verify. */
  queue: 'Pulls awaiting verification',
} as const

/** Status words of a pull, keyed by its stored status. */
export const PULL_STATUS_WORDS = {
  verified: VERIFICATION.verified,
  submitted: VERIFICATION.awaiting,
  rejected: VERIFICATION.rejected,
} as const

/** The automatic checks the software runs on every pull; never "verification". */
export const AUTO_CHECKS = {
  /** The report's name. */
  name: 'Automatic checks',
  /** One outcome's word, the same on the shop's, the admin's and the racer's screens. */
  outcome: { pass: 'Passes', warn: 'Worth a look', fail: 'Fails' },
  /** Each check's name, the same for the shop, the admin and the racer. */
  titles: {
    'rpm-order': 'Engine speed rises',
    'rpm-spacing': 'Even sampling',
    'power-torque-agreement': 'Power agrees with torque × rpm',
    'declared-peaks': 'Declared peaks match the file',
    'correction-factor': 'Correction factor fits the weather',
    'bmep': 'BMEP plausible for the aspiration',
    'piston-speed': 'Piston speed plausible',
    'duplicate-curve': 'Curve not already on another build',
  } as Record<string, string>,
  /** The shop's button that runs the checks on a file before it is saved. */
  run: 'Run the automatic checks',
} as const

export type CheckOutcome = keyof typeof AUTO_CHECKS.outcome

/** Labels of the figures on build cards, the same on every card. */
export const CARD_LABELS = {
  peakPower: 'Peak power',
  peakTorque: 'Peak torque',
  displacement: 'Displacement',
  /** The power averaged across the racer's rpm band. */
  band: 'In your band',
  /** The listed price: what this engine cost as built (parts and labour); a shop quotes a new one. */
  price: 'As-built price',
} as const

/** Paging words, one pattern for every list. */
export function pageOf(page: number, pages: number): string {
  return `Page ${page} of ${pages}`
}

/**
 * Phrasings the product no longer uses: each named the wrong idea or said one idea another way.
 * Kept here so the vocabulary test can refuse them anywhere in the code.
 */
export const RETIRED_PHRASES = [
  'Evidence checked',
  'Checked by an admin',
  'Awaiting check',
  'Checked builds',
  'Look again',
  'Look closer',
  'Awaiting an admin\'s check',
] as const
