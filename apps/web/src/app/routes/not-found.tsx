import { Link } from "react-router";

export function Component() {
  return (
    <div className="mx-auto mt-24 max-w-lg text-center">
      <p className="font-mono text-sm text-ink-500">404</p>
      <h1 className="mt-2 text-2xl font-semibold">Nothing is deposited here</h1>
      <p className="mt-2 text-ink-700">The page you asked for does not exist, or it moved.</p>
      <Link to="/" className="mt-6 inline-block rounded-md bg-ink-900 px-4 py-2 text-sm text-paper">
        Go to the overview
      </Link>
    </div>
  );
}
