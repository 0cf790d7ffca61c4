export function Component() {
  return <p className="text-ink-700">This page (revision) is being built.</p>;
}
