"use client";
// Two renditions side by side whose zoom and pan move together: one view
// state drives a CSS transform on both images. Buttons, arrow keys (+, -, 0)
// on either picture, Ctrl or Cmd with the wheel, and dragging all change it.
import { useEffect, useId, useRef, useState, type KeyboardEvent, type PointerEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";

export interface ComparisonChoice {
  /** Unique among the choices, e.g. "<reduction id>:structure". */
  value: string;
  label: string;
  src: string;
  alt: string;
}

interface View {
  scale: number;
  x: number;
  y: number;
}

const MIN_SCALE = 1;
const MAX_SCALE = 16;
const PAN_STEP_PX = 40;
const HOME: View = { scale: 1, x: 0, y: 0 };

function clampScale(s: number): number {
  return Math.min(MAX_SCALE, Math.max(MIN_SCALE, s));
}

export function LinkedComparison({ choices }: { choices: ComparisonChoice[] }) {
  const [left, setLeft] = useState(choices[0]?.value ?? "");
  const [right, setRight] = useState(choices[1]?.value ?? choices[0]?.value ?? "");
  const [view, setView] = useState<View>(HOME);
  const drag = useRef<{ x: number; y: number; id: number } | null>(null);
  const helpId = useId();
  const frames = useRef<(HTMLDivElement | null)[]>([]);

  // React attaches wheel listeners as passive, so preventDefault would be ignored: listen natively.
  useEffect(() => {
    function onWheel(e: WheelEvent) {
      // A plain wheel keeps scrolling the page; with Ctrl or Cmd it zooms both pictures.
      if (!e.ctrlKey && !e.metaKey) return;
      e.preventDefault();
      const factor = e.deltaY < 0 ? 1.25 : 1 / 1.25;
      setView((v) => ({ ...v, scale: clampScale(v.scale * factor) }));
    }
    const els = frames.current.filter((el): el is HTMLDivElement => el !== null);
    for (const el of els) el.addEventListener("wheel", onWheel, { passive: false });
    return () => {
      for (const el of els) el.removeEventListener("wheel", onWheel);
    };
  }, [choices.length]);

  if (choices.length < 2) {
    return <p className="text-ink-muted">A comparison needs at least two renditions: a finished reduction gives two, each further one two more.</p>;
  }
  const zoom = (factor: number) => setView((v) => ({ ...v, scale: clampScale(v.scale * factor) }));
  const pan = (dx: number, dy: number) => setView((v) => ({ ...v, x: v.x + dx, y: v.y + dy }));

  function onKey(e: KeyboardEvent) {
    const moves: Record<string, () => void> = {
      ArrowLeft: () => pan(PAN_STEP_PX, 0),
      ArrowRight: () => pan(-PAN_STEP_PX, 0),
      ArrowUp: () => pan(0, PAN_STEP_PX),
      ArrowDown: () => pan(0, -PAN_STEP_PX),
      "+": () => zoom(1.5),
      "=": () => zoom(1.5),
      "-": () => zoom(1 / 1.5),
      "0": () => setView(HOME),
    };
    const move = moves[e.key];
    if (move) {
      e.preventDefault();
      move();
    }
  }
  function onPointerDown(e: PointerEvent) {
    drag.current = { x: e.clientX, y: e.clientY, id: e.pointerId };
    (e.currentTarget as HTMLElement).setPointerCapture(e.pointerId);
  }
  function onPointerMove(e: PointerEvent) {
    const d = drag.current;
    if (!d || d.id !== e.pointerId) return;
    pan(e.clientX - d.x, e.clientY - d.y);
    drag.current = { ...d, x: e.clientX, y: e.clientY };
  }
  const endDrag = () => {
    drag.current = null;
  };

  const panes = [
    { key: "left", label: "Left picture", value: left, set: setLeft },
    { key: "right", label: "Right picture", value: right, set: setRight },
  ];
  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-4 md:grid-cols-2">
        {panes.map((p) => (
          <Field key={p.key} label={p.label}>
            <Select value={p.value} onChange={(e) => p.set(e.target.value)} options={choices.map((c) => ({ value: c.value, label: c.label }))} />
          </Field>
        ))}
      </div>
      <div className="flex flex-wrap items-center gap-2" role="group" aria-label="Zoom and pan both pictures">
        <Button size="sm" onClick={() => zoom(1.5)} aria-label="Zoom in">
          +
        </Button>
        <Button size="sm" onClick={() => zoom(1 / 1.5)} aria-label="Zoom out">
          −
        </Button>
        <Button size="sm" onClick={() => pan(PAN_STEP_PX, 0)} aria-label="Pan left">
          ←
        </Button>
        <Button size="sm" onClick={() => pan(0, PAN_STEP_PX)} aria-label="Pan up">
          ↑
        </Button>
        <Button size="sm" onClick={() => pan(0, -PAN_STEP_PX)} aria-label="Pan down">
          ↓
        </Button>
        <Button size="sm" onClick={() => pan(-PAN_STEP_PX, 0)} aria-label="Pan right">
          →
        </Button>
        <Button size="sm" variant="quiet" onClick={() => setView(HOME)}>
          Whole picture
        </Button>
        <span role="status" aria-live="polite" className="font-mono text-sm text-ink-muted">
          {view.scale.toFixed(1)}×
        </span>
      </div>
      <p id={helpId} className="text-sm text-ink-muted">
        On a picture: arrow keys pan, + and − zoom, 0 shows the whole picture; drag to pan; Ctrl or Cmd with the wheel zooms. Both pictures follow.
      </p>
      <div className="grid gap-4 md:grid-cols-2">
        {panes.map((p, i) => {
          const choice = choices.find((c) => c.value === p.value) ?? choices[0];
          return (
            <figure key={p.key} className="flex flex-col gap-2">
              <div
                tabIndex={0}
                role="group"
                aria-label={`${p.label}: ${choice.label}`}
                aria-describedby={helpId}
                onKeyDown={onKey}
                ref={(el) => {
                  frames.current[i] = el;
                }}
                onPointerDown={onPointerDown}
                onPointerMove={onPointerMove}
                onPointerUp={endDrag}
                onPointerCancel={endDrag}
                className="aspect-[4/3] cursor-grab touch-none overflow-hidden rounded-card border border-line bg-black focus-visible:outline-2 focus-visible:outline-offset-2 active:cursor-grabbing"
              >
                {/* eslint-disable-next-line @next/next/no-img-element -- outputs served by our own route, already sized */}
                <img
                  src={choice.src}
                  alt={choice.alt}
                  draggable={false}
                  className="h-full w-full origin-center object-contain select-none"
                  style={{ transform: `translate(${view.x}px, ${view.y}px) scale(${view.scale})` }}
                />
              </div>
              <figcaption className="text-sm">{choice.label}</figcaption>
            </figure>
          );
        })}
      </div>
    </div>
  );
}
