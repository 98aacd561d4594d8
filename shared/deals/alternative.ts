import { displacementCi } from '../engine/geometry'
import type { QuoteAlternative } from '../schemas/deals'
import type { AlternativeView } from '../types/deals'

/** An alternative combination with its displacement, computed from bore, stroke and cylinders by shared/engine. */
export function alternativeView(alternative: QuoteAlternative): AlternativeView {
  return { ...alternative, displacementCi: displacementCi(alternative.boreIn, alternative.strokeIn, alternative.cylinders) }
}

/** Whether a displacement is inside a request's cap: null when the request has no cap. */
export function insideCap(displacement: number, capCi: number | null): boolean | null {
  return capCi === null ? null : displacement <= capCi
}
