// Core thin-film engine: materials, design format, spectra, fast evaluator, fields.
// Conventions: λ nm, thickness nm, substrate mm, angle degrees in the incident medium,
// N = n − ik (k ≥ 0 absorbing), layers in deposition order (layers[0] on the substrate).
export {
  ConstantModelSchema,
  CauchyModelSchema,
  SellmeierModelSchema,
  TablePointSchema,
  TableModelSchema,
  TaucLorentzModelSchema,
  DrudeLorentzModelSchema,
  LorentzOscillatorSchema,
  UrbachTailSchema,
  ValidRangeSchema,
  MaterialModelSchema,
  MaterialRoleSchema,
  MaterialSchema,
  refractiveIndex,
  indexTable,
  validRange,
  taucLorentzEpsilon,
  assertPhysicalIndex,
  HC_EV_NM,
  MAX_INDEX,
} from "./materials.ts";
export type {
  MaterialModel,
  MaterialModelInput,
  MaterialRole,
  Material,
  MaterialInput,
  IndexValue,
  IndexTable,
  ValidRange,
  UrbachTail,
} from "./materials.ts";
export { MATERIAL_LIBRARY, getMaterial } from "./library.ts";
export {
  DESIGN_FORMAT,
  LayerSchema,
  SubstrateSchema,
  DesignSchema,
  parseDesign,
  qwotToThickness,
  thicknessToQwot,
  designFromQwots,
  layerQwots,
  designJsonSchema,
  checkDesignInputs,
  MAX_LAYER_THICKNESS_NM,
  MAX_SUBSTRATE_THICKNESS_MM,
} from "./design.ts";
export type { Layer, Substrate, Design, DesignInput, QwotLayer, QwotDesignSpec } from "./design.ts";
// named StackPolarization here so the studies half may keep its own identical alias
export type { Polarization as StackPolarization } from "./kernel.ts";
export { forwardSqrt } from "./kernel.ts";
export { createStackEvaluator } from "./evaluator.ts";
export type { RTA, StackEvaluator, StackEvaluatorOptions } from "./evaluator.ts";
export {
  computeSpectrum,
  wavelengthGrid,
  groupDelay,
  coneQuadrature,
  coneHalfAngleDeg,
  coneRule,
  angleRangeRule,
  adaptiveRule,
  averageRule,
  coneAverage,
  computeSpectrumAtAngles,
  createLiveSpectrum,
  evenGrid,
  gaussLegendre,
  ANGLE_RULE_TOLERANCE,
  ANGLE_RULE_MAX_PANELS,
  SPEED_OF_LIGHT_NM_PER_FS,
} from "./spectrum.ts";
export type {
  PolResponse,
  Spectrum,
  SpectrumOptions,
  ConeOption,
  ConeRay,
  AngleRule,
  RuleResponses,
  LiveSpectrum,
  LiveSpectrumOptions,
  GroupDelayOptions,
} from "./spectrum.ts";
export { fieldProfile } from "./field.ts";
export type { FieldProfileOptions, FieldProfile } from "./field.ts";
export { parseFormula, designFromFormula, MAX_FORMULA_LAYERS } from "./formula.ts";
export type { FormulaLayer, FormulaDesignSpec } from "./formula.ts";
export {
  COLOUR_WAVELENGTHS,
  ObserverSchema,
  IlluminantSchema,
  ColourBoxXySchema,
  ColourBoxLabSchema,
  ColourDeltaESchema,
  ColourRequirementSchema,
  illuminantA,
  labFromXyz,
  colourFromSamples,
  colourOfSpectrum,
  colourOfDesign,
  colourSwatch,
  deltaE,
  evaluateColourRequirement,
  judgeColour,
  colourFailureReason,
} from "./colour.ts";
export type {
  Observer,
  Illuminant,
  ColourCoordinates,
  ColourOptions,
  DesignColourOptions,
  ColourRequirement,
  ColourRequirementInput,
  ColourVerdict,
  ColourJudgement,
  ColourLimiting,
} from "./colour.ts";
export { CIE_START_NM, CIE_STEP_NM, CIE_ROWS } from "./cie-tables.ts";
