import localFont from "next/font/local";

// Shipped in fonts/ (OFL); nothing is fetched at build or run time.
export const textFont = localFont({
  src: [
    { path: "../fonts/atkinson-hyperlegible-next-latin-400-normal.woff2", weight: "400", style: "normal" },
    { path: "../fonts/atkinson-hyperlegible-next-latin-700-normal.woff2", weight: "700", style: "normal" },
  ],
  variable: "--font-text",
  display: "swap",
});

export const figureFont = localFont({
  src: [
    { path: "../fonts/atkinson-hyperlegible-mono-latin-400-normal.woff2", weight: "400", style: "normal" },
    { path: "../fonts/atkinson-hyperlegible-mono-latin-700-normal.woff2", weight: "700", style: "normal" },
  ],
  variable: "--font-figures",
  display: "swap",
});
