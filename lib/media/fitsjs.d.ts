// fitsjs 0.6.6 ships no types; only the parts fitsjs-node.ts uses are described.
declare module "fitsjs" {
  const fitsjs: { astro: { FITS: unknown } };
  export default fitsjs;
}
