export function Component() {
  return <p className="text-ink-700">This page (reset-password) is being built.</p>;
}
