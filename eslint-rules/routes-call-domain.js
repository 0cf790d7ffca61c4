// Routes parse, authorise and call a domain function; only the domain layer (apps/api/src/domain) writes the
// database (DEVELOPERS.md, "Layout and why"). Applied to apps/api/src/routes/** by eslint.config.js (and to the
// demo seeder, src/demo/**, which may only open its one transaction: `{ allow: ["transaction"] }`), this rule
// refuses there every use of a write: drizzle's insert/update/delete and raw statements, a transaction, an audit
// entry, lucia's session writes; called, handed on (`.bind`), called by a computed name, or destructured.
// Hand-written (about 50 lines) because no-restricted-syntax cannot say in one message what to do instead, and the
// list is easier to test as a function (writeOf).

/** Properties that write: drizzle's builders and raw statements, transactions, lucia's session writes. */
export const WRITE_METHODS = new Set([
  "insert",
  "update",
  "delete",
  "run",
  "exec",
  "transaction",
  "createSession",
  "invalidateSession",
  "invalidateUserSessions",
  "deleteExpiredSessions",
]);
/** Functions that write. */
export const WRITE_FUNCTIONS = new Set(["recordAudit"]);

const keyName = (key, computed) =>
  !computed && key.type === "Identifier"
    ? key.name
    : key.type === "Literal" && typeof key.value === "string"
      ? key.value
      : null;

/** The write an AST node makes or reaches (e.g. ".insert"), or null; `allowed` names writes let through. */
export function writeOf(node, allowed = new Set()) {
  if (node.type === "MemberExpression") {
    const name = keyName(node.property, node.computed);
    if (!name || !WRITE_METHODS.has(name) || allowed.has(name)) return null;
    // node:crypto's createHash(...).update(...) feeds a hash, it writes nothing.
    const obj = node.object;
    if (
      obj.type === "CallExpression" &&
      obj.callee.type === "Identifier" &&
      ["createHash", "createHmac"].includes(obj.callee.name)
    )
      return null;
    // Called (`db.insert(...)`) or handed on (`db.insert.bind(db)`); a data field named `run` (`out.run.id`) is not.
    const parent = node.parent;
    const called = parent?.type === "CallExpression" && parent.callee === node;
    const handedOn =
      parent?.type === "MemberExpression" &&
      parent.object === node &&
      ["bind", "call", "apply"].includes(keyName(parent.property, parent.computed));
    return called || handedOn ? `.${name}` : null;
  }
  if (node.type === "Property" && node.parent?.type === "ObjectPattern") {
    // `const { insert } = ctx.db`; `run` is left out: `const { run } = startRun(...)` names a yield run.
    const name = keyName(node.key, node.computed);
    return name && name !== "run" && WRITE_METHODS.has(name) && !allowed.has(name) ? `{ ${name} }` : null;
  }
  if (
    node.type === "CallExpression" &&
    node.callee.type === "Identifier" &&
    WRITE_FUNCTIONS.has(node.callee.name)
  )
    return `${node.callee.name}()`;
  return null;
}

/** @type {import("eslint").Rule.RuleModule} */
const rule = {
  meta: {
    type: "problem",
    docs: {
      description: "Routes do not write the database: they call a domain function (apps/api/src/domain)",
    },
    schema: [
      {
        type: "object",
        properties: { allow: { type: "array", items: { enum: [...WRITE_METHODS] } } },
        additionalProperties: false,
      },
    ],
  },
  create(context) {
    const allowed = new Set(context.options[0]?.allow ?? []);
    const check = (node) => {
      const write = writeOf(node, allowed);
      if (write)
        context.report({
          node,
          message: `${write} in a route: routes parse, authorise and call a domain function; move the write (with its transaction and audit entry) into apps/api/src/domain/.`,
        });
    };
    return { MemberExpression: check, Property: check, CallExpression: check };
  },
};

export default { rules: { "routes-call-domain": rule } };
