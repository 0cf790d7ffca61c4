/** The Stackproof wordmark: a small layered glyph and the name. */
export function Brand() {
  return (
    <span className="inline-flex items-center gap-2 font-semibold tracking-tight text-paper">
      <svg aria-hidden viewBox="0 0 32 32" className="h-6 w-6">
        <rect width="32" height="32" rx="7" fill="#1d3352" />
        <rect x="7" y="8" width="18" height="3" rx="1" fill="#f2b45a" />
        <rect x="7" y="13" width="18" height="3" rx="1" fill="#7cc6c0" />
        <rect x="7" y="18" width="18" height="3" rx="1" fill="#f2b45a" />
        <rect x="7" y="23" width="18" height="2" rx="1" fill="#e9e4d8" />
      </svg>
      <span className="text-lg">Stackproof</span>
    </span>
  );
}
