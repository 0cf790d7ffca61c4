export const WRITE_METHODS: Set<string>;
export const WRITE_FUNCTIONS: Set<string>;
export function writeOf(node: unknown, allowed?: Set<string>): string | null;
declare const plugin: { rules: Record<string, unknown> };
export default plugin;
