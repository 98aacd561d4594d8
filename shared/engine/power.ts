/** Power, torque and mean effective pressure. */
import { finite, nonNegative, positive } from './guard'
import { CC_PER_CI, NM_PER_LBFT, W_PER_HP, hpToKw, kwToHp, lbFtToNm, nmToLbFt, hpToPs, psToHp } from './units'

export { hpToKw, kwToHp, lbFtToNm, nmToLbFt, hpToPs, psToHp }

/**
 * The rpm at which hp equals lb·ft: 1 hp = 33,000 ft·lbf/min, and power = torque × 2π × rpm,
 * so hp = lb·ft × rpm / (33,000 / 2π) = lb·ft × rpm / 5252.11.
 */
export const HP_TORQUE_CROSSOVER_RPM = 33000 / (2 * Math.PI)

/** Power in hp from torque in lb·ft at an rpm. */
export function hpFromTorque(lbFt: number, rpm: number): number {
  finite('lbFt', lbFt)
  nonNegative('rpm', rpm)
  return (lbFt * rpm) / HP_TORQUE_CROSSOVER_RPM
}

/** Torque in lb·ft from power in hp at an rpm (rpm above zero). */
export function torqueFromHp(hp: number, rpm: number): number {
  finite('hp', hp)
  positive('rpm', rpm)
  return (hp * HP_TORQUE_CROSSOVER_RPM) / rpm
}

/** Power in kW from torque in N·m: P = T ω, ω = 2π rpm / 60. */
export function kwFromNm(nm: number, rpm: number): number {
  finite('nm', nm)
  nonNegative('rpm', rpm)
  return (nm * 2 * Math.PI * rpm) / 60 / 1000
}

/** Torque in N·m from power in kW. */
export function nmFromKw(kw: number, rpm: number): number {
  finite('kw', kw)
  positive('rpm', rpm)
  return (kw * 1000 * 60) / (2 * Math.PI * rpm)
}

/**
 * Brake mean effective pressure of a four-stroke engine in psi: BMEP = 4π T / Vd
 * (Heywood 1988, §2.7: mep = P n_R / (V_d N), n_R = 2), T in lbf·in, so BMEP = 4π × 12 × lb·ft / in³ ≈ 150.8 × lb·ft / in³.
 */
export function bmepPsi(lbFt: number, ci: number): number {
  finite('lbFt', lbFt)
  positive('ci', ci)
  return (4 * Math.PI * 12 * lbFt) / ci
}

/** Four-stroke BMEP in kPa from N·m and litres: 4π T / Vd, Vd in m³, result in Pa ÷ 1000. */
export function bmepKpa(nm: number, litres: number): number {
  finite('nm', nm)
  positive('litres', litres)
  return (4 * Math.PI * nm) / litres
}

/** Four-stroke BMEP in kPa straight from lb·ft and in³. */
export function bmepKpaFromImperial(lbFt: number, ci: number): number {
  return bmepKpa(finite('lbFt', lbFt) * NM_PER_LBFT, (positive('ci', ci) * CC_PER_CI) / 1000)
}

/** Specific output in hp per in³. */
export function hpPerCi(hp: number, ci: number): number {
  return finite('hp', hp) / positive('ci', ci)
}

/** Specific output in hp per litre. */
export function hpPerLitre(hp: number, litres: number): number {
  return finite('hp', hp) / positive('litres', litres)
}

/** Specific output in kW per litre, from hp. */
export function kwPerLitreFromHp(hp: number, litres: number): number {
  return (finite('hp', hp) * W_PER_HP) / 1000 / positive('litres', litres)
}
