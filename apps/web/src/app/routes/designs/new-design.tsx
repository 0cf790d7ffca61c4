export function Component() {
  return <p className="text-ink-700">This page (new-design) is being built.</p>;
}
