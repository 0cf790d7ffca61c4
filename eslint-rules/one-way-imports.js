// One-way imports across the house (DEVELOPERS.md, "Layout and why"):
//   - a web feature does not import another feature (shared code moves down to src/components or src/lib);
//   - shared web code (src/components, src/lib, src/config, src/workers) does not import features;
//   - packages/optics and packages/contracts import nothing of apps/;
//   - in apps/api/src: only app.ts imports routes/; only the entry point (index.ts) imports demo/; the domain layer
//     imports no routes, app, context, entry point or demo (domain functions take db, mail, env).
// Hand-written (about 50 lines) rather than eslint-plugin-import-x's no-restricted-paths: our imports are relative
// with explicit .ts extensions, so resolving them is a path.resolve, and the rule needs no resolver configuration.
import path from "node:path";

const ROOT = path.dirname(path.dirname(new URL(import.meta.url).pathname));
const WEB_SRC = path.join(ROOT, "apps/web/src");
const FEATURES = path.join(WEB_SRC, "features");
const SHARED_WEB = ["components", "lib", "config", "workers"].map((d) => path.join(WEB_SRC, d));
const PACKAGES = ["optics", "contracts"].map((d) => path.join(ROOT, "packages", d));
const APPS = path.join(ROOT, "apps");
const APP_PACKAGES = /^@stackproof\/(api|web)(\/|$)/;
const API_SRC = path.join(ROOT, "apps/api/src");
const api = (p) => path.join(API_SRC, p);

const inside = (dir, file) => file === dir || file.startsWith(dir + path.sep);
const featureOf = (file) =>
  inside(FEATURES, file) ? path.relative(FEATURES, file).split(path.sep)[0] : null;

/** Why importing `specifier` from `file` breaks the one-way rule, or null when it does not. */
export function violation(file, specifier) {
  const target = specifier.startsWith(".") ? path.resolve(path.dirname(file), specifier) : null;
  if (PACKAGES.some((p) => inside(p, file))) {
    if (APP_PACKAGES.test(specifier) || (target && inside(APPS, target)))
      return "packages/optics and packages/contracts import nothing of apps/";
    return null;
  }
  if (!target) return null;
  if (inside(API_SRC, file)) return apiViolation(file, target);
  const from = featureOf(file);
  const to = featureOf(target);
  if (from && to && from !== to)
    return `feature "${from}" imports feature "${to}": features do not import each other; move the shared part to src/components or src/lib`;
  if (to && SHARED_WEB.some((d) => inside(d, file)))
    return `shared web code imports feature "${to}": shared code (components, lib, config, workers) does not import features`;
  return null;
}

function apiViolation(file, target) {
  const routes = api("routes");
  if (inside(api("domain"), file)) {
    const upward = [api("app.ts"), api("context.ts"), api("index.ts")];
    if (inside(routes, target) || inside(api("demo"), target) || upward.includes(target))
      return "the domain layer imports no routes, app, context, entry point or demo: domain functions take what they use (db, mail, env)";
  }
  if (inside(routes, target) && !inside(routes, file) && file !== api("app.ts"))
    return "only src/app.ts imports routes/: move what is shared into src/domain or src/lib";
  if (inside(api("demo"), target) && !inside(api("demo"), file) && file !== api("index.ts"))
    return "only the entry point (src/index.ts) loads the demo seeder: the demo builds on the domain, nothing builds on the demo";
  return null;
}

/** @type {import("eslint").Rule.RuleModule} */
const rule = {
  meta: {
    type: "problem",
    docs: {
      description:
        "Imports go one way: features ↛ features, shared ↛ features, packages ↛ apps, api domain ↛ routes",
    },
    schema: [],
  },
  create(context) {
    const file = path.resolve(context.filename);
    const check = (node) => {
      const source = node.source;
      if (!source || source.type !== "Literal" || typeof source.value !== "string") return;
      const message = violation(file, source.value);
      if (message) context.report({ node: source, message });
    };
    return {
      ImportDeclaration: check,
      ExportNamedDeclaration: check,
      ExportAllDeclaration: check,
      ImportExpression: check,
    };
  },
};

export default { rules: { "one-way-imports": rule } };
