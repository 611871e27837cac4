"use client";
// Two renditions side by side whose zoom and pan move together. Each side is a
// deep-zoom viewer of the rendition's tile pyramid (IIIF level 0), so a zoomed
// view loads the finer tiles and stays sharp; the previews are never enlarged.
// Buttons, the keyboard on either picture (arrows, + and -, 0), Ctrl or Cmd
// with the wheel, pinching and dragging all move both.
import type OpenSeadragon from "openseadragon";
import { useEffect, useId, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";
import { deepZoomOptions } from "@/components/viewer/deep-zoom-options";

export interface ComparisonChoice {
  /** Unique among the choices, e.g. "<reduction id>:structure". */
  value: string;
  label: string;
  /** The rendition's IIIF Image API info.json (or a .dzi descriptor). */
  tileSource: string;
  alt: string;
}

const ZOOM_STEP = 1.5;
const PAN_STEP_PX = 40;
/** OpenSeadragon's flip and rotate keys: a comparison keeps both pictures upright and unmirrored. */
const BLOCKED_KEYS = new Set(["KeyF", "KeyR", "KeyJ", "KeyK"]);

type Side = 0 | 1;

export function LinkedComparison({ choices }: { choices: ComparisonChoice[] }) {
  const [picked, setPicked] = useState<[string, string]>([choices[0]?.value ?? "", choices[1]?.value ?? choices[0]?.value ?? ""]);
  const [zoomText, setZoomText] = useState("1.0×");
  const [failed, setFailed] = useState<[boolean, boolean]>([false, false]);
  const helpId = useId();
  const hosts = useRef<(HTMLDivElement | null)[]>([null, null]);
  const viewers = useRef<(OpenSeadragon.Viewer | null)[]>([null, null]);
  const osdRef = useRef<typeof OpenSeadragon | null>(null);
  const syncing = useRef(false);
  const opened = useRef<[string, string]>(["", ""]);
  const count = choices.length;

  const choiceOf = (value: string) => choices.find((c) => c.value === value) ?? choices[0];

  // Build both viewers once; the sources follow the selects (effect below).
  useEffect(() => {
    if (count < 2) return;
    let cancelled = false;
    void import("openseadragon").then(({ default: osd }) => {
      if (cancelled) return;
      osdRef.current = osd;
      for (const side of [0, 1] as Side[]) {
        const host = hosts.current[side];
        if (!host) continue;
        const viewer = osd(deepZoomOptions(host, { minZoomImageRatio: 0.8, animationTimeS: 0.6 }));
        viewer.addHandler("canvas-key", (e) => {
          if (BLOCKED_KEYS.has(e.originalEvent.code)) e.preventDefaultAction = true;
        });
        // Whatever moves one picture moves the other to the same place, at once.
        viewer.addHandler("viewport-change", () => {
          if (syncing.current) return;
          const other = viewers.current[side === 0 ? 1 : 0];
          if (!other || other.world.getItemCount() === 0) return;
          syncing.current = true;
          other.viewport.zoomTo(viewer.viewport.getZoom(false), undefined, true);
          other.viewport.panTo(viewer.viewport.getCenter(false), true);
          syncing.current = false;
        });
        viewer.addHandler("animation-finish", () => setZoomText(`${(viewer.viewport.getZoom(false) / viewer.viewport.getHomeZoom()).toFixed(1)}×`));
        viewer.addHandler("open", () => {
          setFailed((f) => (side === 0 ? [false, f[1]] : [f[0], false]));
          // A picture chosen anew takes the other's view.
          const other = viewers.current[side === 0 ? 1 : 0];
          if (other && other.world.getItemCount() > 0) {
            syncing.current = true;
            viewer.viewport.zoomTo(other.viewport.getZoom(false), undefined, true);
            viewer.viewport.panTo(other.viewport.getCenter(false), true);
            syncing.current = false;
          }
        });
        viewer.addHandler("open-failed", () => setFailed((f) => (side === 0 ? [true, f[1]] : [f[0], true])));
        viewers.current[side] = viewer;
      }
      opened.current = ["", ""];
      openPicked();
    });
    return () => {
      cancelled = true;
      for (const v of viewers.current) v?.destroy();
      viewers.current = [null, null];
    };
    // Built once per mount; choices reach the viewers through the effect below.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [count]);

  function openPicked() {
    for (const side of [0, 1] as Side[]) {
      const viewer = viewers.current[side];
      const value = picked[side];
      if (!viewer || opened.current[side] === value) continue;
      opened.current[side] = value;
      viewer.open(choiceOf(value).tileSource as unknown as OpenSeadragon.TileSourceSpecifier);
    }
  }

  useEffect(() => {
    openPicked();
    for (const side of [0, 1] as Side[]) {
      const canvas = viewers.current[side]?.canvas;
      if (!canvas) continue;
      const choice = choiceOf(picked[side]);
      canvas.setAttribute("role", "img");
      canvas.setAttribute("aria-roledescription", "zoomable picture");
      canvas.setAttribute("aria-label", `${side === 0 ? "Left" : "Right"} picture: ${choice.alt}`);
      canvas.setAttribute("aria-describedby", helpId);
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [picked, helpId]);

  if (count < 2) {
    return <p className="text-ink-muted">A comparison needs at least two renditions: a finished reduction gives two, each further one two more.</p>;
  }

  const lead = () => viewers.current[0] ?? viewers.current[1];
  const zoom = (factor: number) => {
    const v = lead();
    if (!v) return;
    v.viewport.zoomBy(factor);
    v.viewport.applyConstraints();
  };
  const pan = (dx: number, dy: number) => {
    const v = lead();
    const osd = osdRef.current;
    if (!v || !osd) return;
    v.viewport.panBy(v.viewport.deltaPointsFromPixels(new osd.Point(dx, dy)));
    v.viewport.applyConstraints();
  };

  const panes = [
    { side: 0 as Side, label: "Left picture" },
    { side: 1 as Side, label: "Right picture" },
  ];
  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-4 md:grid-cols-2">
        {panes.map((p) => (
          <Field key={p.side} label={p.label}>
            <Select
              value={picked[p.side]}
              onChange={(e) => {
                const value = e.target.value;
                setPicked((old) => (p.side === 0 ? [value, old[1]] : [old[0], value]));
              }}
              options={choices.map((c) => ({ value: c.value, label: c.label }))}
            />
          </Field>
        ))}
      </div>
      <div className="flex flex-wrap items-center gap-2" role="group" aria-label="Zoom and pan both pictures">
        <Button size="sm" onClick={() => zoom(ZOOM_STEP)} aria-label="Zoom in">
          +
        </Button>
        <Button size="sm" onClick={() => zoom(1 / ZOOM_STEP)} aria-label="Zoom out">
          −
        </Button>
        <Button size="sm" onClick={() => pan(-PAN_STEP_PX, 0)} aria-label="Pan left">
          ←
        </Button>
        <Button size="sm" onClick={() => pan(0, -PAN_STEP_PX)} aria-label="Pan up">
          ↑
        </Button>
        <Button size="sm" onClick={() => pan(0, PAN_STEP_PX)} aria-label="Pan down">
          ↓
        </Button>
        <Button size="sm" onClick={() => pan(PAN_STEP_PX, 0)} aria-label="Pan right">
          →
        </Button>
        <Button size="sm" variant="quiet" onClick={() => lead()?.viewport.goHome()}>
          Whole picture
        </Button>
        <span role="status" aria-live="polite" className="font-mono text-sm text-ink-muted">
          {zoomText}
        </span>
      </div>
      <p id={helpId} className="text-sm text-ink-muted">
        On a picture: arrow keys pan, + and − zoom, 0 shows the whole picture; drag to pan; Ctrl or Cmd with the wheel zooms. Both pictures follow, and zoomed views load finer tiles.
      </p>
      <div className="grid gap-4 md:grid-cols-2">
        {panes.map((p) => {
          const choice = choiceOf(picked[p.side]);
          return (
            <figure key={p.side} className="flex min-w-0 flex-col gap-2">
              <div className="relative aspect-[4/3] overflow-hidden rounded-card border border-line bg-black">
                <div
                  ref={(el) => {
                    hosts.current[p.side] = el;
                  }}
                  data-testid={`compare-${p.side === 0 ? "left" : "right"}`}
                  className="absolute inset-0"
                />
                {failed[p.side] ? (
                  <p role="alert" className="absolute inset-x-0 top-1/2 px-4 text-center text-sm text-white">
                    This rendition&apos;s tiles could not be loaded.
                  </p>
                ) : null}
              </div>
              <figcaption className="text-sm">{choice.label}</figcaption>
            </figure>
          );
        })}
      </div>
    </div>
  );
}
