export function Component() {
  return <p className="text-ink-700">This page (forgot-password) is being built.</p>;
}
