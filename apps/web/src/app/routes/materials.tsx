export function Component() {
  return <p className="text-ink-700">This page (materials) is being built.</p>;
}
