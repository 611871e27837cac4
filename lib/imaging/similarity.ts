// Similarity transforms between master (reference) pixels and frame pixels.
// Convention: p_frame = scale R(theta) (p_master - c) + c + (dx, dy), with c the
// image centre ((width - 1) / 2, (height - 1) / 2) and R(theta) turning +x
// toward +y (clockwise on screen, since y points down).

export interface SimilarityTransform {
  dx: number;
  dy: number;
  rotationDeg: number;
  scale: number;
}

export const IDENTITY_TRANSFORM: SimilarityTransform = { dx: 0, dy: 0, rotationDeg: 0, scale: 1 };

/** The same map as x' = a x - b y + tx, y' = b x + a y + ty. */
export interface AffineSimilarity {
  a: number;
  b: number;
  tx: number;
  ty: number;
}

export function toAffine(t: SimilarityTransform, width: number, height: number): AffineSimilarity {
  const cx = (width - 1) / 2;
  const cy = (height - 1) / 2;
  const theta = (t.rotationDeg * Math.PI) / 180;
  const a = t.scale * Math.cos(theta);
  const b = t.scale * Math.sin(theta);
  return { a, b, tx: cx + t.dx - (a * cx - b * cy), ty: cy + t.dy - (b * cx + a * cy) };
}

export function fromAffine(m: AffineSimilarity, width: number, height: number): SimilarityTransform {
  const cx = (width - 1) / 2;
  const cy = (height - 1) / 2;
  return {
    dx: m.a * cx - m.b * cy + m.tx - cx,
    dy: m.b * cx + m.a * cy + m.ty - cy,
    rotationDeg: (Math.atan2(m.b, m.a) * 180) / Math.PI,
    scale: Math.hypot(m.a, m.b),
  };
}

export function applyAffine(m: AffineSimilarity, x: number, y: number): { x: number; y: number } {
  return { x: m.a * x - m.b * y + m.tx, y: m.b * x + m.a * y + m.ty };
}

export function invertAffine(m: AffineSimilarity): AffineSimilarity {
  const d = m.a * m.a + m.b * m.b;
  const a = m.a / d;
  const b = -m.b / d;
  return { a, b, tx: -(a * m.tx - b * m.ty), ty: -(b * m.tx + a * m.ty) };
}

/** outer(inner(p)). */
export function composeAffine(outer: AffineSimilarity, inner: AffineSimilarity): AffineSimilarity {
  return {
    a: outer.a * inner.a - outer.b * inner.b,
    b: outer.b * inner.a + outer.a * inner.b,
    tx: outer.a * inner.tx - outer.b * inner.ty + outer.tx,
    ty: outer.b * inner.tx + outer.a * inner.ty + outer.ty,
  };
}

/** Rotation by angleRad and scaling by scale about the point (px, py). */
export function createAffineAbout(px: number, py: number, angleRad: number, scale: number): AffineSimilarity {
  const a = scale * Math.cos(angleRad);
  const b = scale * Math.sin(angleRad);
  return { a, b, tx: px - (a * px - b * py), ty: py - (b * px + a * py) };
}
