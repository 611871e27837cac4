"use client";
import { useSyncExternalStore } from "react";
import { buildOverlayScene, type OverlayScene, type Vec2 } from "./overlay-geometry";
import type { PlateStage, StageFrame } from "./osd-stage";
import type { OverlayKey, ViewerGeometry } from "./types";

const COMPASS_INSET_PX = 56;
const COMPASS_ARROW_PX = 38;
const SCALE_INSET_PX = 16;
/** Below this on-screen radius a ring's label would sit on the ring's own stroke: left out. */
const RING_LABEL_MIN_RADIUS_PX = 36;

const serverFrame = () => null;

/**
 * The overlays over the image, redrawn from the stage's image-to-screen map on
 * every viewport change (the same frame OpenSeadragon draws). Decorative for
 * assistive technology: the viewer's text summary says the same in words.
 */
export function OverlayLayer({ stage, geometry, overlays }: { stage: PlateStage; geometry: ViewerGeometry; overlays: ReadonlySet<OverlayKey> }) {
  const frame = useSyncExternalStore(stage.subscribe, stage.getFrame, serverFrame);
  if (!frame || overlays.size === 0) return null;
  const scene = buildOverlayScene(frame.transform, geometry, overlays, frame.widthPx);
  return <OverlaySvg scene={scene} frame={frame} />;
}

function OverlaySvg({ scene, frame }: { scene: OverlayScene; frame: StageFrame }) {
  const { widthPx: w, heightPx: h } = frame;
  return (
    <svg
      aria-hidden="true"
      className="pointer-events-none absolute inset-0 size-full overflow-hidden"
      viewBox={`0 0 ${w} ${h}`}
      width={w}
      height={h}
    >
      <g fill="none" strokeWidth={1.5}>
        {scene.rings.map((ring) => (
          <g key={ring.multiple}>
            <circle cx={ring.centre.x} cy={ring.centre.y} r={ring.radiusPx} stroke="#000" strokeOpacity={0.55} strokeWidth={3.5} />
            <circle cx={ring.centre.x} cy={ring.centre.y} r={ring.radiusPx} stroke="#f3d98b" strokeOpacity={ring.multiple === 1 ? 0.95 : 0.75} />
            {ring.radiusPx >= RING_LABEL_MIN_RADIUS_PX ? <HaloText at={ring.label} dx={6} dy={-6} text={`${ring.multiple} R☉`} /> : null}
          </g>
        ))}
        {scene.moon ? (
          <g>
            <circle cx={scene.moon.centre.x} cy={scene.moon.centre.y} r={scene.moon.radiusPx} stroke="#000" strokeOpacity={0.55} strokeWidth={3.5} />
            <circle cx={scene.moon.centre.x} cy={scene.moon.centre.y} r={scene.moon.radiusPx} stroke="#9fd4ff" strokeDasharray="8 6" />
          </g>
        ) : null}
      </g>
      {scene.compass ? <Compass origin={{ x: w - COMPASS_INSET_PX, y: h - COMPASS_INSET_PX - 8 }} north={scene.compass.north} east={scene.compass.east} /> : null}
      {scene.scaleBars.length > 0 ? <ScaleBars bars={scene.scaleBars} left={SCALE_INSET_PX} bottom={h - SCALE_INSET_PX} /> : null}
    </svg>
  );
}

function HaloText({ at, text, dx = 0, dy = 0, anchor = "start" }: { at: Vec2; text: string; dx?: number; dy?: number; anchor?: "start" | "middle" }) {
  return (
    <text
      x={at.x + dx}
      y={at.y + dy}
      textAnchor={anchor}
      dominantBaseline="middle"
      fill="#f8f2dc"
      stroke="#000"
      strokeWidth={3}
      paintOrder="stroke"
      fontSize={13}
      fontWeight={600}
      style={{ fontFamily: "var(--font-sans)" }}
    >
      {text}
    </text>
  );
}

function Arrow({ origin, dir, colour, letter }: { origin: Vec2; dir: Vec2; colour: string; letter: string }) {
  const tip = { x: origin.x + dir.x * COMPASS_ARROW_PX, y: origin.y + dir.y * COMPASS_ARROW_PX };
  // Arrow head: two short strokes back from the tip, 25 degrees either side.
  const back = (sign: number) => {
    const a = (sign * 25 * Math.PI) / 180;
    const bx = -(dir.x * Math.cos(a) - dir.y * Math.sin(a));
    const by = -(dir.x * Math.sin(a) + dir.y * Math.cos(a));
    return `${tip.x + bx * 10},${tip.y + by * 10}`;
  };
  const path = `M${origin.x},${origin.y} L${tip.x},${tip.y} M${back(1)} L${tip.x},${tip.y} L${back(-1)}`;
  const label = { x: origin.x + dir.x * (COMPASS_ARROW_PX + 12), y: origin.y + dir.y * (COMPASS_ARROW_PX + 12) };
  return (
    <g>
      <path d={path} stroke="#000" strokeOpacity={0.6} strokeWidth={4.5} fill="none" strokeLinecap="round" />
      <path d={path} stroke={colour} strokeWidth={2} fill="none" strokeLinecap="round" />
      <HaloText at={label} text={letter} anchor="middle" />
    </g>
  );
}

function Compass({ origin, north, east }: { origin: Vec2; north: Vec2; east: Vec2 }) {
  return (
    <g>
      <circle cx={origin.x} cy={origin.y} r={3} fill="#f8f2dc" stroke="#000" />
      <Arrow origin={origin} dir={north} colour="#f3d98b" letter="N" />
      <Arrow origin={origin} dir={east} colour="#9fd4ff" letter="E" />
    </g>
  );
}

function ScaleBars({ bars, left, bottom }: { bars: OverlayScene["scaleBars"]; left: number; bottom: number }) {
  const rowPx = 30;
  return (
    <g>
      {bars.map((bar, i) => {
        const y = bottom - (bars.length - 1 - i) * rowPx;
        const d = `M${left},${y - 6} L${left},${y} L${left + bar.lengthPx},${y} L${left + bar.lengthPx},${y - 6}`;
        return (
          <g key={bar.label}>
            <path d={d} stroke="#000" strokeOpacity={0.6} strokeWidth={5} fill="none" />
            <path d={d} stroke="#f8f2dc" strokeWidth={2} fill="none" />
            <HaloText at={{ x: left, y: y - 14 }} text={bar.label} />
          </g>
        );
      })}
    </g>
  );
}
