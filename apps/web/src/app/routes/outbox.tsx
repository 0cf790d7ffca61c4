export function Component() {
  return <p className="text-ink-700">This page (outbox) is being built.</p>;
}
