export function Component() {
  return <p className="text-ink-700">This page (accept-invitation) is being built.</p>;
}
