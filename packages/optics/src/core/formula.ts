/**
 * Formula entry: a stack written as QWOT multiples of letters, e.g. "(HL)^8 H" or
 * "(0.5L H 0.5L)^7", one material per letter, QWOTs at the reference wavelength λ0.
 *
 * Grammar (whitespace is free between tokens):
 *
 *     formula := item*
 *     item    := [number] (LETTER | "(" item* ")") ["^" integer]
 *
 * A number before a letter or a group multiplies its QWOTs ("2H" is a half wave of H, "0.5(HL)"
 * halves both); "^n" repeats the letter or group n times. Letters are single ASCII letters and
 * case-sensitive. The formula is read in DEPOSITION ORDER, left to right: the first letter is the
 * first layer deposited, on the substrate (as `layers[0]` in the design format).
 *
 * Hand-written recursive-descent parser: the grammar is five rules, and a generator would add a
 * dependency and give worse column-precise messages.
 */
import { designFromQwots, type Design } from "./design.ts";
import type { Material } from "./materials.ts";

/** Most layers one formula may expand to (a 10,000-layer stack is already far beyond practice). */
export const MAX_FORMULA_LAYERS = 10_000;

/** One layer of an expanded formula. */
export interface FormulaLayer {
  /** the letter as written */
  symbol: string;
  /** quarter-wave optical thicknesses at λ0 (1 = λ0/4) */
  qwot: number;
  /** 1-based column of the letter in the formula */
  column: number;
}

class Parser {
  private pos = 0;
  constructor(private readonly text: string) {}

  private fail(message: string, at = this.pos): never {
    const shown = this.text.length > 80 ? this.text.slice(0, 77) + "..." : this.text;
    throw new RangeError(`formula, column ${at + 1}: ${message} (in "${shown}")`);
  }

  private skipSpace(): void {
    while (this.pos < this.text.length && /\s/.test(this.text[this.pos]!)) this.pos++;
  }

  private peek(): string | undefined {
    this.skipSpace();
    return this.text[this.pos];
  }

  parseAll(): FormulaLayer[] {
    const out = this.items(false);
    if (this.pos < this.text.length) this.fail(`unexpected "${this.text[this.pos]}"`);
    if (out.length === 0) this.fail("expected at least one layer (a letter such as H or L)", 0);
    return out;
  }

  private items(inGroup: boolean): FormulaLayer[] {
    const out: FormulaLayer[] = [];
    for (;;) {
      const c = this.peek();
      if (c === undefined) {
        if (inGroup) this.fail('expected ")" to close the group');
        return out;
      }
      if (c === ")") {
        if (!inGroup) this.fail('unexpected ")" without an opening "("');
        return out;
      }
      for (const l of this.item()) {
        out.push(l);
        if (out.length > MAX_FORMULA_LAYERS) this.fail(`expands to more than ${MAX_FORMULA_LAYERS} layers`);
      }
    }
  }

  private number(): number | null {
    const start = this.pos;
    const m = /^(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?/.exec(this.text.slice(this.pos));
    if (!m) return null;
    this.pos += m[0].length;
    const v = Number(m[0]);
    if (!Number.isFinite(v) || !(v > 0)) this.fail(`expected a QWOT multiplier > 0, got ${m[0]}`, start);
    return v;
  }

  private item(): FormulaLayer[] {
    this.skipSpace();
    const start = this.pos;
    const factor = this.number() ?? 1;
    this.skipSpace();
    const c = this.text[this.pos];
    let body: FormulaLayer[];
    if (c === "(") {
      this.pos++;
      body = this.items(true);
      this.pos++; // the ")" that items() stopped at
      if (body.length === 0) this.fail("empty group", start);
    } else if (c !== undefined && /[A-Za-z]/.test(c)) {
      body = [{ symbol: c, qwot: 1, column: this.pos + 1 }];
      this.pos++;
    } else if (c === undefined) {
      this.fail("expected a letter or a group after the number");
    } else {
      this.fail(`unexpected "${c}" (expected a letter, a number or "(")`);
    }
    let times = 1;
    if (this.peek() === "^") {
      this.pos++;
      this.skipSpace();
      const at = this.pos;
      const m = /^\d+/.exec(this.text.slice(this.pos));
      if (!m) this.fail('expected a whole number of repeats after "^"');
      this.pos += m[0].length;
      times = Number(m[0]);
      if (!(times >= 1)) this.fail(`expected at least 1 repeat, got ${m[0]}`, at);
      if (times * body.length > MAX_FORMULA_LAYERS)
        this.fail(`expands to more than ${MAX_FORMULA_LAYERS} layers`, at);
    }
    const out: FormulaLayer[] = [];
    for (let r = 0; r < times; r++) for (const l of body) out.push({ ...l, qwot: l.qwot * factor });
    return out;
  }
}

/**
 * Expand a stack formula into layers with their QWOTs (deposition order).
 *
 * @throws RangeError whose message names the 1-based column, e.g.
 *   `formula, column 5: expected ")" to close the group (in "(HL^8")`
 */
export function parseFormula(formula: string): FormulaLayer[] {
  return new Parser(formula).parseAll();
}

/** Arguments of {@link designFromFormula}. */
export interface FormulaDesignSpec {
  name: string;
  formula: string;
  /** letter → material id, e.g. { H: "TiO2", L: "SiO2" } */
  materials: Readonly<Record<string, string>>;
  /** λ0, nm: the wavelength the QWOTs refer to */
  referenceWavelength: number;
  substrate: { material: string; thicknessMm: number; backside: boolean };
  incident?: string;
  exit?: string;
  /** design-local materials (copied into the design) */
  customMaterials?: Material[];
}

/**
 * Build a validated design from a formula: each letter's physical thickness is
 * d = QWOT · λ0 / (4 n(λ0)) of its material (k ignored); layers are labelled with their letter.
 *
 * @throws RangeError naming the column of a letter that has no material, or a formula error
 */
export function designFromFormula(spec: FormulaDesignSpec): Design {
  const layers = parseFormula(spec.formula);
  for (const l of layers) {
    const id = spec.materials[l.symbol];
    if (id === undefined || id === "") {
      throw new RangeError(`formula, column ${l.column}: no material given for letter "${l.symbol}"`);
    }
  }
  return designFromQwots({
    name: spec.name,
    referenceWavelength: spec.referenceWavelength,
    layers: layers.map((l) => ({ material: spec.materials[l.symbol]!, qwot: l.qwot, label: l.symbol })),
    substrate: spec.substrate,
    ...(spec.incident ? { incident: spec.incident } : {}),
    ...(spec.exit ? { exit: spec.exit } : {}),
    ...(spec.customMaterials ? { materials: spec.customMaterials } : {}),
  });
}
