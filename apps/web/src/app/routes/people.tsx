export function Component() {
  return <p className="text-ink-700">This page (people) is being built.</p>;
}
