/**
 * Unit conversions with the exact factors of NIST Special Publication 811 (2008), Appendix B.
 * Every factor here is either exact by definition or the value NIST gives to the digits shown.
 */
import { finite } from './guard'

/** 1 in = 25.4 mm exactly (NIST SP 811 B.8, international inch). */
export const MM_PER_IN = 25.4
/** 1 in³ = 16.387064 cm³ exactly (the cube of 2.54 cm). */
export const CC_PER_CI = 16.387064
/** 1 lb (avoirdupois) = 0.45359237 kg exactly (NIST SP 811 B.8). */
export const G_PER_LB = 453.59237
/** 1 lbf = 4.4482216152605 N exactly (0.45359237 kg × 9.80665 m/s²). */
export const N_PER_LBF = 4.4482216152605
/** 1 lbf·ft = 1.3558179483314004 N·m: the exact product 0.3048 m × 4.4482216152605 N, to double precision. */
export const NM_PER_LBFT = 0.3048 * N_PER_LBF
/** 1 hp (550 ft·lbf/s) = 745.69987158227022 W: the exact product 550 × 0.3048 × 4.4482216152605, to double precision. */
export const W_PER_HP = 550 * 0.3048 * N_PER_LBF
/** 1 metric horsepower (PS) = 75 kgf·m/s = 735.49875 W exactly. */
export const W_PER_PS = 735.49875
/**
 * 1 inHg = 3386.389 Pa: the conventional inch of mercury (NIST SP 811 B.8, "inch of mercury,
 * conventional"), the one barometers and the correction standards are read in. The 32 °F inch of
 * mercury is 3386.38 Pa in the same table, 0.0003 % apart.
 */
export const PA_PER_INHG = 3386.389
/** 1 mbar = 100 Pa exactly. */
export const PA_PER_MBAR = 100
/** 1 ft = 0.3048 m exactly (NIST SP 811 B.8, international foot). */
export const M_PER_FT = 0.3048
/** 1 psi (lbf/in²) = 6894.757293168361 Pa: the exact quotient 4.4482216152605 N / (0.0254 m)², to double precision. */
export const PA_PER_PSI = N_PER_LBF / (0.0254 * 0.0254)
/** 1 ft³ = 0.028316846592 m³ exactly (the cube of 0.3048 m). */
export const M3_PER_FT3 = M_PER_FT ** 3

export const inToMm = (inches: number): number => finite('length', inches) * MM_PER_IN
export const mmToIn = (mm: number): number => finite('length', mm) / MM_PER_IN
export const ciToCc = (ci: number): number => finite('volume', ci) * CC_PER_CI
export const ccToCi = (cc: number): number => finite('volume', cc) / CC_PER_CI

export const hpToKw = (hp: number): number => (finite('power', hp) * W_PER_HP) / 1000
export const kwToHp = (kw: number): number => (finite('power', kw) * 1000) / W_PER_HP
export const psToHp = (ps: number): number => (finite('power', ps) * W_PER_PS) / W_PER_HP
export const hpToPs = (hp: number): number => (finite('power', hp) * W_PER_HP) / W_PER_PS
export const lbFtToNm = (lbFt: number): number => finite('torque', lbFt) * NM_PER_LBFT
export const nmToLbFt = (nm: number): number => finite('torque', nm) / NM_PER_LBFT

export const inHgToKpa = (inHg: number): number => (finite('pressure', inHg) * PA_PER_INHG) / 1000
export const kpaToInHg = (kpa: number): number => (finite('pressure', kpa) * 1000) / PA_PER_INHG
export const inHgToMbar = (inHg: number): number => (finite('pressure', inHg) * PA_PER_INHG) / PA_PER_MBAR
export const mbarToInHg = (mbar: number): number => (finite('pressure', mbar) * PA_PER_MBAR) / PA_PER_INHG

export const psiToKpa = (psi: number): number => (finite('pressure', psi) * PA_PER_PSI) / 1000
export const kpaToPsi = (kpa: number): number => (finite('pressure', kpa) * 1000) / PA_PER_PSI

/** ft/min to m/s: × 0.3048 m/ft ÷ 60 s/min. */
export const ftMinToMs = (ftMin: number): number => (finite('speed', ftMin) * M_PER_FT) / 60
export const msToFtMin = (ms: number): number => (finite('speed', ms) * 60) / M_PER_FT

/** ft³/min to m³/min. */
export const cfmToM3Min = (cfm: number): number => finite('airflow', cfm) * M3_PER_FT3
export const m3MinToCfm = (m3Min: number): number => finite('airflow', m3Min) / M3_PER_FT3

/** lb/h to kg/h (0.45359237 kg/lb exactly). */
export const lbHrToKgHr = (lbHr: number): number => (finite('fuel flow', lbHr) * G_PER_LB) / 1000
export const kgHrToLbHr = (kgHr: number): number => (finite('fuel flow', kgHr) * 1000) / G_PER_LB

/** Brake-specific fuel consumption, lb/(hp·h) to g/(kW·h): × 453.59237 g/lb ÷ 0.7456999 kW/hp. */
export const bsfcToMetric = (lbPerHpHr: number): number => (finite('bsfc', lbPerHpHr) * G_PER_LB) / (W_PER_HP / 1000)
export const bsfcToImperial = (gPerKwHr: number): number => (finite('bsfc', gPerKwHr) * (W_PER_HP / 1000)) / G_PER_LB

/** °F to °C: t_C = (t_F − 32) / 1.8 (NIST SP 811 B.8, exact). */
export const fToC = (f: number): number => (finite('temperature', f) - 32) / 1.8
/** °C to °F: t_F = 1.8 t_C + 32. */
export const cToF = (c: number): number => finite('temperature', c) * 1.8 + 32
