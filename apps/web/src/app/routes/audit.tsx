export function Component() {
  return <p className="text-ink-700">This page (audit) is being built.</p>;
}
