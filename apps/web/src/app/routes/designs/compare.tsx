export function Component() {
  return <p className="text-ink-700">This page (compare) is being built.</p>;
}
