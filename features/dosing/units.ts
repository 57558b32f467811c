// Exact unit definitions. US gallon = 231 cubic inches; inch = 2.54 cm (exact since 1959);
// imperial gallon = 4.54609 L (exact by the UK Weights and Measures Act 1985).
export const CM_PER_INCH = 2.54;
export const LITRES_PER_US_GALLON = (231 * CM_PER_INCH ** 3) / 1000;
export const LITRES_PER_IMPERIAL_GALLON = 4.54609;

export const volumeUnits = ["L", "mL", "gal_us", "gal_imp"] as const;
export type VolumeUnit = (typeof volumeUnits)[number];
export const lengthUnits = ["cm", "in"] as const;
export type LengthUnit = (typeof lengthUnits)[number];
export const temperatureUnits = ["C", "F"] as const;
export type TemperatureUnit = (typeof temperatureUnits)[number];

export const volumeUnitLabels: Record<VolumeUnit, string> = {
  L: "litres",
  mL: "millilitres",
  gal_us: "US gallons",
  gal_imp: "imperial gallons",
};

const litresPer: Record<VolumeUnit, number> = {
  L: 1,
  mL: 0.001,
  gal_us: LITRES_PER_US_GALLON,
  gal_imp: LITRES_PER_IMPERIAL_GALLON,
};

export function toLitres(value: number, unit: VolumeUnit): number {
  return value * litresPer[unit];
}

export function fromLitres(litres: number, unit: VolumeUnit): number {
  return litres / litresPer[unit];
}

/** Water volume of a rectangular tank from inside length × width × water depth, less displacement. */
export function litresFromDimensions(
  length: number,
  width: number,
  depth: number,
  unit: LengthUnit,
  displacementPercent = 0,
): number {
  const f = unit === "in" ? CM_PER_INCH : 1;
  const cubicCm = length * f * (width * f) * (depth * f);
  return (cubicCm / 1000) * (1 - displacementPercent / 100);
}

export const celsiusFromFahrenheit = (f: number) => ((f - 32) * 5) / 9;
export const fahrenheitFromCelsius = (c: number) => (c * 9) / 5 + 32;

export function toCelsius(value: number, unit: TemperatureUnit): number {
  return unit === "F" ? celsiusFromFahrenheit(value) : value;
}

/**
 * The least water a treatment is planned or reported for: 100 mL (a small hospital container). Below it a
 * volume is a slip of the unit (mL typed for L), and its concentrations run to absurd figures.
 */
export const MIN_WATER_LITRES = 0.1;
export const MIN_WATER_MESSAGE = "The water must be at least 100 mL (0.1 L); check the volume and its unit.";
