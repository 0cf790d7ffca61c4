export function Component() {
  return (
    <div className="mx-auto mt-16 max-w-sm rounded-xl border border-ink-100 bg-white p-8 shadow-sm">
      <h1 className="text-xl font-semibold">Sign in to Stackproof</h1>
      <p className="mt-2 text-sm text-ink-700">Sign-in arrives with accounts and roles.</p>
    </div>
  );
}
