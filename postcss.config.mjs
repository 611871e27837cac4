// Tailwind 4 runs as a single PostCSS plugin; it handles imports and vendor prefixes itself.
const config = {
  plugins: {
    "@tailwindcss/postcss": {},
  },
};

export default config;
