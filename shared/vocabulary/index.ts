/**
 * The project's names in one place: lines, ratios, ions, extinction laws, classes per diagram,
 * demarcation curves, calibrations and flags. Each entry has its key (the API's and the stored data's spelling, never
 * changed), its label in astronomers' notation and what its consumers need (wavelength, colour,
 * default R_V, IMF, caution text). Zod enums, the kernel, the server and the dashboard all read
 * these lists; nothing else spells them out.
 */
export * from './lines.ts'
export * from './ratios.ts'
export * from './extinction-laws.ts'
export * from './classes.ts'
export * from './curves.ts'
export * from './calibrations.ts'
export * from './flags.ts'
