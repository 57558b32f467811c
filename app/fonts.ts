import localFont from "next/font/local";

// Shipped with the app (fonts/, SIL Open Font License): no font is fetched at build or run time.
export const bodyFont = localFont({
  src: [
    { path: "../fonts/atkinson-hyperlegible-latin-400-normal.woff2", weight: "400", style: "normal" },
    { path: "../fonts/atkinson-hyperlegible-latin-400-italic.woff2", weight: "400", style: "italic" },
    { path: "../fonts/atkinson-hyperlegible-latin-700-normal.woff2", weight: "700", style: "normal" },
    { path: "../fonts/atkinson-hyperlegible-latin-700-italic.woff2", weight: "700", style: "italic" },
  ],
  variable: "--font-body",
  display: "swap",
});

export const displayFont = localFont({
  src: [
    { path: "../fonts/fraunces-latin-600-normal.woff2", weight: "600", style: "normal" },
    { path: "../fonts/fraunces-latin-700-normal.woff2", weight: "700", style: "normal" },
  ],
  variable: "--font-display",
  display: "swap",
});
