export function Component() {
  return <p className="text-ink-700">This page (program) is being built.</p>;
}
