/**
 * Thermal responses of vital rates: the rate (or hazard) as a function of
 * temperature. Parameters are in the units people use — °C for temperatures,
 * eV for activation energies — and converted to kelvin only inside the
 * Boltzmann–Arrhenius and Sharpe–Schoolfield formulas, which are published in
 * kelvin; the Brière and Gaussian–quadratic formulas are published in °C and
 * are evaluated in °C. Pure maths, no I/O.
 */
import type { ThermalResponse } from "../lifecycle/thermal";

/** Boltzmann constant in eV/K (CODATA 2018; exact since the 2019 SI redefinition). */
export const BOLTZMANN_EV = 8.617333262e-5;
/** 0 °C in kelvin. */
export const KELVIN_OFFSET = 273.15;

export const kelvin = (celsius: number): number => celsius + KELVIN_OFFSET;

/**
 * Value of a response at `celsius` °C, in the rate's own units (a hazard per
 * time step when the response applies to a hazard).
 */
export function responseValue(r: ThermalResponse, celsius: number): number {
  switch (r.form) {
    case "arrhenius": {
      // Gillooly et al. 2001 (Science 293:2248); Brown et al. 2004 (Ecology 85:1771).
      const T = kelvin(celsius);
      const Tref = kelvin(r.referenceTemperature);
      return r.valueAtReference * Math.exp(-(r.activationEnergy / BOLTZMANN_EV) * (1 / T - 1 / Tref));
    }
    case "schoolfield": {
      // Schoolfield, Sharpe & Magnuson 1981 (J. theor. Biol. 88:719), high-temperature inactivation term only.
      const T = kelvin(celsius);
      const Tref = kelvin(r.referenceTemperature);
      const Th = kelvin(r.inactivationTemperature);
      const rise = Math.exp(-(r.activationEnergy / BOLTZMANN_EV) * (1 / T - 1 / Tref));
      const fall = 1 + Math.exp((r.inactivationEnergy / BOLTZMANN_EV) * (1 / Th - 1 / T));
      return (r.valueAtReference * rise) / fall;
    }
    case "gaussian-quadratic": {
      // Deutsch et al. 2008 (PNAS 105:6668): Gaussian rise below T_opt, quadratic fall to CT_max, 0 beyond.
      const T = celsius;
      if (T <= r.optimum) {
        const z = (T - r.optimum) / (2 * r.width);
        return r.valueAtOptimum * Math.exp(-z * z);
      }
      if (T >= r.criticalMaximum) return 0;
      const q = (T - r.optimum) / (r.optimum - r.criticalMaximum);
      return r.valueAtOptimum * (1 - q * q);
    }
    case "briere": {
      // Brière et al. 1999 (Environ. Entomol. 28:22): a·T·(T − T₀)·√(T_L − T) on (T₀, T_L), else 0.
      const T = celsius;
      if (T <= r.lower || T >= r.upper) return 0;
      return r.coefficient * T * (T - r.lower) * Math.sqrt(r.upper - T);
    }
  }
}

/**
 * Temperature (°C) at which the response peaks, from each form's published
 * optimum formula; null for Boltzmann–Arrhenius, which rises without a peak.
 */
export function responseOptimum(r: ThermalResponse): number | null {
  switch (r.form) {
    case "arrhenius":
      return null;
    case "schoolfield": {
      // T_opt = E_h T_h / [E_h + k T_h ln(E_h/E − 1)] (kelvin), defined when E_h > E.
      if (!(r.inactivationEnergy > r.activationEnergy)) return null;
      const Th = kelvin(r.inactivationTemperature);
      const Eh = r.inactivationEnergy;
      return (Eh * Th) / (Eh + BOLTZMANN_EV * Th * Math.log(Eh / r.activationEnergy - 1)) - KELVIN_OFFSET;
    }
    case "gaussian-quadratic":
      return r.optimum;
    case "briere": {
      // [4T_L + 3T₀ + √(16T_L² + 9T₀² − 16T₀T_L)] / 10 (°C).
      const { lower: T0, upper: TL } = r;
      return (4 * TL + 3 * T0 + Math.sqrt(16 * TL * TL + 9 * T0 * T0 - 16 * T0 * TL)) / 10;
    }
  }
}

/** Q10: the factor by which the response changes over 10 °C from `celsius`. */
export function q10(r: ThermalResponse, celsius: number): number {
  return responseValue(r, celsius + 10) / responseValue(r, celsius);
}

/**
 * dr/dT (per °C) by Richardson-extrapolated central differences (step h and
 * h/2, error O(h⁴)); at the Brière and Gaussian–quadratic limits, where the
 * response has a kink, the one-sided value nearer the inside is not sought.
 */
export function responseSlope(r: ThermalResponse, celsius: number, h = 1e-2): number {
  const d = (s: number) => (responseValue(r, celsius + s) - responseValue(r, celsius - s)) / (2 * s);
  const d1 = d(h);
  const d2 = d(h / 2);
  return (4 * d2 - d1) / 3;
}
