export function Component() {
  return <p className="text-ink-700">This page (release-record) is being built.</p>;
}
