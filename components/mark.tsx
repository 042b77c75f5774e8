/**
 * The Paritas mark: a seven-bit codeword drawn as bars — four data bits in ink,
 * three parity bits in brass.
 */
const BAR_X = [0, 3.4, 6.8, 10.2, 13.6, 17, 20.4];

export function Mark({ className }: { className?: string }) {
  return (
    <svg viewBox="0 0 22.6 16" className={className} aria-hidden="true" focusable="false">
      {BAR_X.map((x, i) => (
        <rect
          key={x}
          x={x}
          y={i < 4 ? 0 : 4}
          width="2.2"
          height={i < 4 ? 16 : 12}
          rx="1.1"
          fill={i < 4 ? "currentColor" : "var(--pa-brass)"}
        />
      ))}
    </svg>
  );
}

/** The same mark as a standalone SVG, for favicons (no CSS variables available there). */
export const markSvg =
  `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 32 32">` +
  `<rect width="32" height="32" rx="7" fill="#161b22"/>` +
  BAR_X.map(
    (x, i) =>
      `<rect x="${(4.7 + x).toFixed(1)}" y="${i < 4 ? 8 : 12}" width="2.2" height="${i < 4 ? 16 : 12}" rx="1.1" fill="${i < 4 ? "#f4f2ea" : "#e0b04a"}"/>`,
  ).join("") +
  `</svg>`;

export const markDataUri = `data:image/svg+xml,${encodeURIComponent(markSvg)}`;
