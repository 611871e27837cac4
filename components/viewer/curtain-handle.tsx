"use client";
import { useRef, type PointerEvent } from "react";

/**
 * The curtain's line and grip over the image, dragged with a pointer. The range
 * input beside the viewer is its keyboard and screen reader twin, so this one is
 * hidden from assistive technology and takes no focus.
 */
export function CurtainHandle({ fraction, leftLabel, rightLabel, onMove }: { fraction: number; leftLabel: string; rightLabel: string; onMove: (fraction: number) => void }) {
  const dragging = useRef(false);

  function moveTo(e: PointerEvent<HTMLDivElement>) {
    const box = e.currentTarget.parentElement?.parentElement?.getBoundingClientRect();
    if (!box || box.width <= 0) return;
    onMove(Math.min(1, Math.max(0, (e.clientX - box.left) / box.width)));
  }

  return (
    <div aria-hidden="true" className="pointer-events-none absolute inset-0">
      <span className="absolute top-2 left-2 rounded-control bg-black/70 px-2 py-1 text-xs font-medium text-white">◀ {leftLabel}</span>
      <span className="absolute top-2 right-2 rounded-control bg-black/70 px-2 py-1 text-xs font-medium text-white">{rightLabel} ▶</span>
      <div
        className="pointer-events-auto absolute top-0 bottom-0 flex w-8 -translate-x-1/2 cursor-ew-resize touch-none justify-center"
        style={{ left: `${fraction * 100}%` }}
        onPointerDown={(e) => {
          dragging.current = true;
          e.currentTarget.setPointerCapture(e.pointerId);
          moveTo(e);
        }}
        onPointerMove={(e) => dragging.current && moveTo(e)}
        onPointerUp={() => (dragging.current = false)}
        onPointerCancel={() => (dragging.current = false)}
      >
        <div className="h-full w-0.5 bg-white shadow-[0_0_0_1px_rgb(0_0_0/0.6)]" />
        <div className="absolute top-1/2 grid size-11 -translate-y-1/2 place-items-center rounded-full border-2 border-white bg-black/70 text-white shadow-lg">
          <svg viewBox="0 0 24 24" className="size-5" fill="none" stroke="currentColor" strokeWidth={2} strokeLinecap="round" strokeLinejoin="round">
            <path d="m9 7-5 5 5 5M15 7l5 5-5 5" />
          </svg>
        </div>
      </div>
    </div>
  );
}
