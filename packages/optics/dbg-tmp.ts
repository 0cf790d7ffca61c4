import { createSpecEvaluator } from "./src/studies/index.ts";
import { conditionsStudy } from "./bench/spec-conditions.ts";
const st = conditionsStudy(10);
const ev = createSpecEvaluator(st.design as never, st.mask);
for (const g of ev.groups) console.log(g.conditions, g.wavelengths.length);
// @ts-ignore
console.log((ev as any));
