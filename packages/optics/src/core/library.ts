/**
 * Built-in material library. Thin-film indices depend strongly on the deposition process;
 * the film values here are typical values for dense films, good for design studies, and
 * are marked "approximate, from memory" unless a published formula is quoted exactly.
 * Teams should override them with their own measured constants (design-local materials).
 *
 * Conventions: N = n − ik (k ≥ 0 absorbing); Cauchy/Sellmeier in µm; tables in nm.
 */
import type { Material } from "./materials.ts";

const FROM_MEMORY = "approximate, from memory";
// Film ranges: the visible and near infrared where the Cauchy form of a dense oxide or fluoride film
// is normally fitted (common practice, no source); the short end stops at the absorption edge.

/** The built-in library, read-only. Ids are stable and referenced by designs. */
export const MATERIAL_LIBRARY: readonly Material[] = Object.freeze([
  // ---- media ----
  {
    id: "air",
    name: "Air",
    model: { kind: "constant", n: 1, k: 0, range: [190, 30000] },
    role: "medium",
    source: "n = 1 (the 2.7e-4 excess of real air is neglected, common practice, no source)",
  },
  {
    id: "water",
    name: "Water",
    model: { kind: "cauchy", A: 1.3247, B: 0.00331, C: -0.0000321, range: [400, 900] },
    role: "medium",
    source: FROM_MEMORY + " (n ≈ 1.333 at 589 nm)",
  },
  // ---- dielectric films (dense films, visible and near infrared) ----
  {
    id: "SiO2",
    name: "Silicon dioxide (film)",
    model: { kind: "cauchy", A: 1.45, B: 0.0036, C: 0, range: [250, 2500] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 1.46 at 550 nm)",
  },
  {
    id: "MgF2",
    name: "Magnesium fluoride (film)",
    model: { kind: "cauchy", A: 1.372, B: 0.0025, C: 0, range: [200, 5000] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 1.38 at 550 nm)",
  },
  {
    id: "Al2O3",
    name: "Aluminium oxide (film)",
    model: { kind: "cauchy", A: 1.615, B: 0.005, C: 0, range: [250, 3000] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 1.63 at 550 nm)",
  },
  {
    id: "HfO2",
    name: "Hafnium dioxide (film)",
    model: { kind: "cauchy", A: 1.94, B: 0.016, C: 0, range: [300, 2500] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 1.99 at 550 nm)",
  },
  {
    id: "ZrO2",
    name: "Zirconium dioxide (film)",
    model: { kind: "cauchy", A: 1.99, B: 0.018, C: 0, range: [320, 2500] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 2.05 at 550 nm)",
  },
  {
    id: "Ta2O5",
    name: "Tantalum pentoxide (film)",
    model: { kind: "cauchy", A: 2.05, B: 0.025, C: 0, range: [350, 2500] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 2.13 at 550 nm)",
  },
  {
    id: "Nb2O5",
    name: "Niobium pentoxide (film)",
    model: {
      kind: "cauchy",
      A: 2.2,
      B: 0.03,
      C: 0,
      urbach: { k0: 0.2, E0: 3.65, Eu: 0.12 },
      range: [340, 2500],
    },
    role: "layer",
    source:
      FROM_MEMORY +
      " (n ≈ 2.30 at 550 nm; Urbach edge k = 0.2·exp((E − 3.65 eV)/0.12 eV), gap of amorphous films ≈ 3.4–3.5 eV, k ≈ 0.002 at 400 nm)",
  },
  {
    id: "TiO2",
    name: "Titanium dioxide (film)",
    model: {
      kind: "cauchy",
      A: 2.21,
      B: 0.045,
      C: 0.0035,
      urbach: { k0: 0.2, E0: 3.54, Eu: 0.13 },
      range: [350, 2500],
    },
    role: "layer",
    source:
      FROM_MEMORY +
      " (n ≈ 2.40 at 550 nm; Urbach edge k = 0.2·exp((E − 3.54 eV)/0.13 eV), gap of films ≈ 3.3 eV, k ≈ 0.007 at 400 nm)",
  },
  {
    id: "Si3N4",
    name: "Silicon nitride (film)",
    model: { kind: "cauchy", A: 1.98, B: 0.014, C: 0, range: [300, 2500] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 2.03 at 550 nm)",
  },
  {
    id: "ZnS",
    name: "Zinc sulfide (film)",
    model: {
      kind: "cauchy",
      A: 2.26,
      B: 0.028,
      C: 0.0025,
      urbach: { k0: 0.3, E0: 3.7, Eu: 0.08 },
      range: [340, 2500],
    },
    role: "layer",
    source:
      FROM_MEMORY +
      " (n ≈ 2.38 at 550 nm, 2.29 at 1000 nm; Urbach edge k = 0.3·exp((E − 3.7 eV)/0.08 eV), gap of cubic ZnS ≈ 3.6–3.7 eV)",
  },
  {
    id: "Ge",
    name: "Germanium (film, infrared)",
    model: {
      kind: "table",
      points: [
        [2000, 4.1, 0],
        [3000, 4.045, 0],
        [5000, 4.016, 0],
        [8000, 4.006, 0],
        [10000, 4.004, 0],
        [14000, 4.0, 0],
      ],
      range: [2000, 14000],
    },
    role: "layer",
    source: FROM_MEMORY + " (bulk values; opaque below about 1.8 µm, so the table starts at 2 µm)",
  },
  // ---- metals (tables over their useful range) ----
  {
    id: "Ag",
    name: "Silver",
    model: {
      kind: "table",
      points: [
        [380, 0.07, 1.78],
        [400, 0.05, 2.07],
        [450, 0.04, 2.62],
        [500, 0.05, 3.07],
        [550, 0.055, 3.43],
        [600, 0.055, 3.84],
        [650, 0.055, 4.28],
        [700, 0.04, 4.7],
        [800, 0.03, 5.49],
        [900, 0.04, 6.25],
        [1000, 0.04, 7.0],
        [1200, 0.05, 8.5],
        [1500, 0.07, 10.6],
        [2000, 0.11, 14.2],
      ],
      range: [380, 2000],
    },
    role: "metal",
    source: FROM_MEMORY + " (shape after Johnson & Christy, Phys. Rev. B 6, 4370, 1972)",
  },
  {
    id: "Al",
    name: "Aluminium",
    model: {
      kind: "table",
      points: [
        [300, 0.28, 3.64],
        [350, 0.38, 4.25],
        [400, 0.49, 4.86],
        [450, 0.62, 5.47],
        [500, 0.77, 6.08],
        [550, 0.96, 6.69],
        [600, 1.2, 7.26],
        [650, 1.47, 7.79],
        [700, 1.83, 8.31],
        [750, 2.4, 8.62],
        [800, 2.8, 8.45],
        [850, 2.75, 8.3],
        [900, 2.06, 8.3],
        [1000, 1.35, 9.6],
        [1200, 1.2, 12.2],
        [1500, 1.5, 15.0],
        [2000, 2.1, 20.0],
      ],
      range: [300, 2000],
    },
    role: "metal",
    source: FROM_MEMORY + " (shape after Rakić, Appl. Opt. 34, 4755, 1995)",
  },
  {
    id: "Au",
    name: "Gold",
    model: {
      kind: "table",
      points: [
        [400, 1.47, 1.95],
        [450, 1.38, 1.85],
        [500, 0.97, 1.87],
        [550, 0.43, 2.45],
        [600, 0.25, 2.98],
        [650, 0.17, 3.5],
        [700, 0.16, 3.95],
        [800, 0.15, 4.9],
        [900, 0.17, 5.7],
        [1000, 0.22, 6.35],
        [1200, 0.28, 7.8],
        [1500, 0.4, 9.5],
        [2000, 0.6, 12.6],
      ],
      range: [400, 2000],
    },
    role: "metal",
    source: FROM_MEMORY + " (shape after Johnson & Christy, Phys. Rev. B 6, 4370, 1972)",
  },
  {
    id: "Cr",
    name: "Chromium",
    model: {
      kind: "table",
      points: [
        [400, 2.2, 3.15],
        [450, 2.45, 3.2],
        [500, 2.75, 3.3],
        [550, 3.05, 3.35],
        [600, 3.2, 3.45],
        [650, 3.4, 3.6],
        [700, 3.6, 3.8],
        [800, 3.9, 4.2],
        [900, 4.1, 4.4],
        [1000, 4.2, 4.5],
        [1200, 4.3, 4.9],
        [1500, 4.4, 5.4],
        [2000, 4.5, 6.3],
      ],
      range: [400, 2000],
    },
    role: "metal",
    source: FROM_MEMORY + " (film values vary widely with deposition)",
  },
  {
    id: "Ag-LD",
    name: "Silver (Lorentz–Drude model)",
    model: {
      kind: "drude-lorentz",
      epsInf: 1,
      Ep: 9.01,
      f0: 0.845,
      gamma0: 0.048,
      oscillators: [
        { f: 0.065, E: 0.816, gamma: 3.886 },
        { f: 0.124, E: 4.481, gamma: 0.452 },
        { f: 0.011, E: 8.185, gamma: 0.065 },
        { f: 0.84, E: 9.083, gamma: 0.916 },
        { f: 5.646, E: 20.29, gamma: 2.419 },
      ],
      range: [250, 12000],
    },
    role: "metal",
    source:
      "Rakić, Djurišić, Elazar & Majewski, Appl. Opt. 37, 5271 (1998), Lorentz–Drude fit for Ag over about 0.1–5 eV; parameters from memory",
  },
  {
    id: "Au-LD",
    name: "Gold (Lorentz–Drude model)",
    model: {
      kind: "drude-lorentz",
      epsInf: 1,
      Ep: 9.03,
      f0: 0.76,
      gamma0: 0.053,
      oscillators: [
        { f: 0.024, E: 0.415, gamma: 0.241 },
        { f: 0.01, E: 0.83, gamma: 0.345 },
        { f: 0.071, E: 2.969, gamma: 0.87 },
        { f: 0.601, E: 4.304, gamma: 2.494 },
        { f: 4.384, E: 13.32, gamma: 2.214 },
      ],
      range: [250, 6000],
    },
    role: "metal",
    source:
      "Rakić, Djurišić, Elazar & Majewski, Appl. Opt. 37, 5271 (1998), Lorentz–Drude fit for Au over about 0.2–5 eV; parameters from memory",
  },
  // ---- substrates ----
  {
    id: "fused-silica",
    name: "Fused silica",
    model: {
      kind: "sellmeier",
      B: [0.6961663, 0.4079426, 0.8974794],
      C: [0.0684043 ** 2, 0.1162414 ** 2, 9.896161 ** 2],
      range: [210, 3710],
    },
    role: "substrate",
    source: "Malitson, J. Opt. Soc. Am. 55, 1205 (1965), Sellmeier fit 0.21–3.71 µm",
  },
  {
    id: "boro-crown",
    name: "Borosilicate crown glass",
    model: {
      kind: "sellmeier",
      B: [1.03961212, 0.231792344, 1.01046945],
      C: [0.00600069867, 0.0200179144, 103.560653],
      range: [300, 2500],
    },
    role: "substrate",
    source:
      "Sellmeier coefficients of the standard borosilicate crown (nd ≈ 1.5168) as printed in optical-glass catalogues; from memory",
  },
  {
    id: "sapphire",
    name: "Sapphire (ordinary ray)",
    model: {
      kind: "sellmeier",
      B: [1.4313493, 0.65054713, 5.3414021],
      C: [0.0726631 ** 2, 0.1193242 ** 2, 18.028251 ** 2],
      range: [200, 5500],
    },
    role: "substrate",
    source: "Malitson & Dodge, J. Opt. Soc. Am. 62, 1405 (1972), ordinary ray; coefficients from memory",
  },
  {
    id: "silicon",
    name: "Silicon (crystalline)",
    model: {
      kind: "table",
      // [λ nm, n, k]; k = αλ/4π from the absorption coefficient α of Green's table
      points: [
        [400, 5.57, 0.303],
        [450, 4.67, 0.0913],
        [500, 4.3, 0.0442],
        [550, 4.08, 0.0281],
        [600, 3.95, 0.0198],
        [650, 3.85, 0.0145],
        [700, 3.78, 0.0106],
        [800, 3.69, 0.0054],
        [900, 3.63, 0.00219],
        [1000, 3.57, 5.09e-4],
        [1010, 3.567, 3.85e-4],
        [1020, 3.564, 2.91e-4],
        [1030, 3.561, 2.2e-4],
        [1040, 3.558, 1.66e-4],
        [1050, 3.555, 1.25e-4],
        [1060, 3.553, 9.45e-5],
        [1070, 3.55, 7.15e-5],
        [1080, 3.547, 5.41e-5],
        [1090, 3.545, 4.07e-5],
        [1100, 3.542, 3.06e-5],
        [1120, 3.537, 1.43e-5],
        [1150, 3.531, 3.7e-6],
        [1200, 3.52, 1.9e-7],
        [1250, 3.51, 0],
        [1550, 3.48, 0],
        [2000, 3.45, 0],
        [5000, 3.425, 0],
        [10000, 3.42, 0],
      ],
      range: [400, 10000],
    },
    role: "substrate",
    source:
      "absorption after Green, Sol. Energy Mater. Sol. Cells 92, 1305 (2008), 300 K table: α = 1.11e4 cm⁻¹ at 500 nm, " +
      "64 cm⁻¹ at 1000 nm, 3.5 cm⁻¹ at 1100 nm, ≈ 10 cm⁻¹ at 1064 nm; α and n recalled from the table (from memory, " +
      "1000–1100 nm geometric between those values); beyond 1.2 µm bulk n (from memory), free-carrier absorption of doped wafers not included",
  },
  {
    id: "germanium",
    name: "Germanium (substrate, infrared)",
    model: {
      kind: "table",
      points: [
        [2000, 4.1, 0],
        [3000, 4.045, 0],
        [5000, 4.016, 0],
        [8000, 4.006, 0],
        [10000, 4.004, 0],
        [12000, 4.003, 0.0002],
        [14000, 4.0, 0.001],
      ],
      range: [2000, 14000],
    },
    role: "substrate",
    source: FROM_MEMORY + " (opaque below about 1.8 µm; lattice absorption beyond 11 µm)",
  },

  // ---- further dielectric films (ranges: the film's transparent region as commonly used) ----
  {
    id: "YF3",
    name: "Yttrium fluoride (film)",
    model: { kind: "cauchy", A: 1.485, B: 0.004, C: 0, range: [200, 2500] },
    role: "layer",
    source:
      FROM_MEMORY + " (n ≈ 1.50 at 550 nm; the film is used into the infrared, fitted here over 0.2–2.5 µm)",
  },
  {
    id: "LaF3",
    name: "Lanthanum fluoride (film)",
    model: { kind: "cauchy", A: 1.575, B: 0.005, C: 0, range: [200, 2500] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 1.59 at 550 nm)",
  },
  {
    id: "AlF3",
    name: "Aluminium fluoride (film)",
    model: { kind: "cauchy", A: 1.37, B: 0.003, C: 0, range: [190, 2000] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 1.38 at 550 nm, porous evaporated film)",
  },
  {
    id: "Y2O3",
    name: "Yttrium oxide (film)",
    model: { kind: "cauchy", A: 1.86, B: 0.012, C: 0, range: [300, 2500] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 1.90 at 550 nm; band gap ≈ 5.6 eV)",
  },
  {
    id: "Sc2O3",
    name: "Scandium oxide (film)",
    model: { kind: "cauchy", A: 1.94, B: 0.013, C: 0, range: [300, 2500] },
    role: "layer",
    source: FROM_MEMORY + " (n ≈ 1.98 at 550 nm; band gap ≈ 5.7 eV)",
  },
  {
    id: "SiO",
    name: "Silicon monoxide (film)",
    model: {
      kind: "cauchy",
      A: 1.88,
      B: 0.02,
      C: 0,
      urbach: { k0: 0.1, E0: 3.5, Eu: 0.3 },
      range: [400, 2500],
    },
    role: "layer",
    source:
      FROM_MEMORY +
      " (n ≈ 1.95 at 550 nm; broad absorption tail into the blue, k ≈ 0.03 at 400 nm: Urbach k = 0.1·exp((E − 3.5 eV)/0.3 eV))",
  },
  {
    id: "ITO",
    name: "Indium tin oxide (film)",
    model: {
      kind: "drude-lorentz",
      epsInf: 4.3,
      Ep: 1.85,
      f0: 1,
      gamma0: 0.12,
      oscillators: [],
      range: [400, 2000],
    },
    role: "layer",
    source:
      FROM_MEMORY +
      " (free-carrier Drude model of a sputtered film, about 1e21 cm⁻³: n ≈ 1.9, k ≈ 0.01 at 550 nm, plasma edge near 1.4 µm; " +
      "the band-gap absorption below 400 nm is not modelled)",
  },
  {
    id: "a-Si",
    name: "Amorphous silicon (film)",
    model: { kind: "tauc-lorentz", A: 122, E0: 3.45, C: 2.54, Eg: 1.2, epsInf: 1.15, range: [300, 2500] },
    role: "layer",
    source:
      "Tauc–Lorentz fit of an amorphous silicon film, Jellison & Modine, Appl. Phys. Lett. 69, 371 (1996), Table I " +
      "(A = 122 eV, E0 = 3.45 eV, C = 2.54 eV, Eg = 1.20 eV, ε1(∞) = 1.15; from memory): n ≈ 4.2, k ≈ 0.4 at 633 nm",
  },
  // ---- infrared substrates ----
  {
    id: "CaF2",
    name: "Calcium fluoride",
    model: {
      kind: "sellmeier",
      B: [0.5675888, 0.4710914, 3.8484723],
      C: [0.050263605 ** 2, 0.1003909 ** 2, 34.64904 ** 2],
      range: [230, 9700],
    },
    role: "substrate",
    source:
      "Malitson, Appl. Opt. 2, 1103 (1963), Sellmeier fit at 24 °C, 0.23–9.7 µm; coefficients from memory",
  },
  {
    id: "ZnSe",
    name: "Zinc selenide (CVD)",
    model: {
      kind: "sellmeier",
      B: [4.45813734, 0.467216334, 2.8956629],
      C: [0.200859853 ** 2, 0.391371166 ** 2, 47.1362108 ** 2],
      range: [540, 18200],
    },
    role: "substrate",
    source:
      "Sellmeier fit of Connolly, DiBenedetto & Donadio, Proc. SPIE 181, 141 (1979) data as given by Tatian, Appl. Opt. 23, 4477 (1984), " +
      "0.54–18.2 µm, room temperature; coefficients from memory",
  },
] satisfies Material[]);

/**
 * Look a material up by id. Design-local (custom) materials override the library.
 *
 * @throws RangeError naming the id when it is neither custom nor in {@link MATERIAL_LIBRARY}
 */
export function getMaterial(id: string, custom?: readonly Material[]): Material {
  const found = custom?.find((m) => m.id === id) ?? MATERIAL_LIBRARY.find((m) => m.id === id);
  if (!found) {
    throw new RangeError(`unknown material id "${id}" (not in the design's materials nor the library)`);
  }
  return found;
}
