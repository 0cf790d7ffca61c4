export function violation(file: string, specifier: string): string | null;
declare const plugin: { rules: Record<string, unknown> };
export default plugin;
