// Cache-Control values shared by every route that serves files.
//
// Public derived files (tiles, previews, renditions, masters, web JPEGs,
// manifests) have the reduction id or the plate version in their URL, but a
// plate can be withdrawn: a year of "immutable" would keep a withdrawn image in
// shared caches and browsers. Five minutes, then a revalidation (a 304 by
// entity tag when nothing changed), bounds how long a withdrawal takes to reach
// every cache. Private files (a member's outputs, thumbnails, originals) are
// never stored by any cache.
export const PUBLIC_REVALIDATE = "public, max-age=300, must-revalidate";
export const PRIVATE_NO_STORE = "private, no-store";
