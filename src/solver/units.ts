// Unit conversions between the practitioner units at the public edge and SI inside the solver.

export const SQRT3 = Math.sqrt(3);
export const VACUUM_PERMITTIVITY_F_PER_M = 8.8541878128e-12;
export const SPEED_OF_LIGHT_M_PER_S = 299_792_458;

export const kvToV = (kv: number): number => kv * 1e3;
export const vToKv = (volts: number): number => volts / 1e3;
export const mwToW = (mw: number): number => mw * 1e6;
export const wToMw = (watts: number): number => watts / 1e6;
export const varToMvar = (vars: number): number => vars / 1e6;
export const mvarToVar = (mvar: number): number => mvar * 1e6;
export const vaToMva = (voltAmperes: number): number => voltAmperes / 1e6;
export const kmToM = (km: number): number => km * 1e3;
export const degToRad = (deg: number): number => (deg * Math.PI) / 180;
export const radToDeg = (rad: number): number => (rad * 180) / Math.PI;
export const angularFrequency = (frequencyHz: number): number => 2 * Math.PI * frequencyHz;
/** Line-to-line kV to phase-to-neutral volts. */
export const phaseVoltsFromLineKv = (kv: number): number => (kv * 1e3) / SQRT3;
/** Phase-to-neutral volts to line-to-line kV. */
export const lineKvFromPhaseVolts = (volts: number): number => (volts * SQRT3) / 1e3;
