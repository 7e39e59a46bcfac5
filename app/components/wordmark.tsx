/** Tilthmark's mark: a soil core in three horizons beside the name. */
export function Wordmark({ size = "md" }: { size?: "md" | "lg" }) {
  const px = size === "lg" ? 40 : 28;
  return (
    <span className="inline-flex items-center gap-2.5 text-loam-950 no-underline">
      <svg width={px} height={px} viewBox="0 0 32 32" aria-hidden="true">
        <rect width="32" height="32" rx="6" fill="#2b2118" />
        <rect x="6" y="8" width="20" height="5" fill="#467a44" />
        <rect x="6" y="15" width="20" height="4" fill="#c66a2c" />
        <rect x="6" y="21" width="20" height="3" fill="#a39280" />
      </svg>
      <span className={`${size === "lg" ? "text-3xl" : "text-xl"} font-semibold tracking-tight`}>Tilthmark</span>
    </span>
  );
}
