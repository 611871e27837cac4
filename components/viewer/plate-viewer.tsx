"use client";
// The plate page's deep-zoom viewer. OpenSeadragon is imported inside an effect,
// so the server build never touches window; everything it draws comes from the
// renditions' tile pyramids, never from one large image.
import { useCallback, useEffect, useId, useMemo, useRef, useState } from "react";
import { cx } from "@/components/ui/cx";
import { CurtainHandle } from "./curtain-handle";
import { KeyboardHelp } from "./keyboard-help";
import { PlateStage, ROTATION_STEP_DEG, ZOOM_STEP } from "./osd-stage";
import { buildOverlayScene, computeNorthEastVectors, computeOverlayAvailability, describeOverlayScene, describeScreenDirection, projectDirection } from "./overlay-geometry";
import { OverlayLayer } from "./overlay-layer";
import { ShareLink } from "./share-link";
import type { OverlayKey, PlateViewerProps, RenditionKey } from "./types";
import { decodeViewState, formatViewQuery, type ViewState } from "./view-state";
import { CurtainControl, MapLayerToggle, OverlayToggles, RenditionSwitch } from "./viewer-options";
import { ViewerToolbar } from "./viewer-toolbar";

/** Quiet time before the address bar and the announcement follow the view (common practice for debouncing). */
const ADDRESS_DEBOUNCE_MS = 400;
const ANNOUNCE_DEBOUNCE_MS = 700;
const DEFAULT_CURTAIN = 0.5;

type Status = { kind: "loading" } | { kind: "ready" } | { kind: "failed"; message: string };

export function PlateViewer({ title, altText, renditions, geometry, mapLayer }: PlateViewerProps) {
  const hostRef = useRef<HTMLDivElement>(null);
  const rootRef = useRef<HTMLElement>(null);
  const altId = useId();
  const keysHintId = useId();
  const overlayTextId = useId();
  const [stage, setStage] = useState<PlateStage | null>(null);
  const [status, setStatus] = useState<Status>({ kind: "loading" });
  const [failed, setFailed] = useState<ReadonlySet<RenditionKey>>(new Set());
  const [rendition, setRendition] = useState<RenditionKey>(renditions[0]?.key ?? "natural");
  const [curtain, setCurtain] = useState<number | null>(null);
  const [overlays, setOverlays] = useState<ReadonlySet<OverlayKey>>(new Set());
  const [fullPage, setFullPage] = useState(false);
  const [mapShown, setMapShown] = useState(false);
  const [zoomReadout, setZoomReadout] = useState("");
  const [rotationDeg, setRotationDeg] = useState(0);
  const [announcement, setAnnouncement] = useState("");
  const [settledCount, setSettledCount] = useState(0);

  const sourcesKey = renditions.map((r) => `${r.key} ${r.tileSource}`).join("\n");
  const availability = useMemo(() => computeOverlayAvailability(geometry), [geometry]);
  // What the delayed callbacks (address bar, announcements) read when they fire.
  const latest = useRef({ rendition, curtain, overlays, geometry });
  useEffect(() => {
    latest.current = { rendition, curtain, overlays, geometry };
  });
  const ready = useRef(false);
  const addressTimer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  const announceTimer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  const spoken = useRef({ zoom: "", rotation: -1 });

  const currentViewState = useCallback((s: PlateStage): ViewState => {
    const { rendition: r, curtain: c, overlays: o } = latest.current;
    return { region: s.region(), rotationDeg: s.rotationDeg(), rendition: r, curtain: c, overlays: [...o] };
  }, []);

  const linkFor = useCallback(
    (s: PlateStage) => {
      const url = new URL(window.location.href);
      url.search = formatViewQuery(currentViewState(s), url.search, renditions[0]?.key);
      return url.toString();
    },
    [currentViewState, renditions],
  );

  const scheduleAddress = useCallback(
    (s: PlateStage) => {
      if (!ready.current) return;
      clearTimeout(addressTimer.current);
      addressTimer.current = setTimeout(() => {
        const link = linkFor(s);
        if (link !== window.location.href) window.history.replaceState(window.history.state, "", link);
      }, ADDRESS_DEBOUNCE_MS);
    },
    [linkFor],
  );

  /** After the view settles: readout, words for the overlays, an announcement of what changed, the address bar. */
  const onSettled = useCallback(
    (s: PlateStage) => {
      const zoom = `${s.zoomTimes().toFixed(1)}`;
      setZoomReadout(`${zoom}×`);
      setRotationDeg(s.rotationDeg());
      setSettledCount((n) => n + 1);
      const g = latest.current.geometry;
      clearTimeout(announceTimer.current);
      announceTimer.current = setTimeout(() => {
        const parts: string[] = [];
        const rotation = Math.round(s.rotationDeg());
        if (spoken.current.rotation !== -1 && rotation !== spoken.current.rotation) {
          parts.push(`Rotated to ${rotation} degrees clockwise`);
          const f = s.getFrame();
          if (f && typeof g.solarNorthAngleDeg === "number" && availability.north.available) {
            parts.push(`solar north points ${describeScreenDirection(projectDirection(f.transform, computeNorthEastVectors(g.solarNorthAngleDeg).north))}`);
          }
        }
        if (spoken.current.zoom !== "" && zoom !== spoken.current.zoom) parts.push(`Zoom ${zoom} times`);
        spoken.current = { zoom, rotation };
        if (parts.length > 0) setAnnouncement(`${parts.join("; ")}.`);
      }, ANNOUNCE_DEBOUNCE_MS);
      scheduleAddress(s);
    },
    [availability, scheduleAddress],
  );

  // Build the viewer once; read the shared view from the address bar when the tiles' descriptors are in.
  useEffect(() => {
    const host = hostRef.current;
    if (!host || renditions.length === 0) return;
    let cancelled = false;
    let created: PlateStage | null = null;
    const settled = () => created && onSettled(created);
    // The readouts follow the target at once; announcements and the address wait for the view to settle.
    const target = () => {
      if (!created) return;
      setZoomReadout(`${created.zoomTimes().toFixed(1)}×`);
      setRotationDeg(created.rotationDeg());
    };
    PlateStage.create(
      host,
      renditions,
      {
        onSettled: settled,
        onTarget: target,
        gestureHint: (gesture, modifier) => (gesture === "drag" ? "Use two fingers to move the image" : `Hold ${modifier} and turn the wheel to zoom`),
      },
      () => cancelled,
      mapLayer?.url,
    )
      .then((result) => {
        if (!result) return;
        const { stage: s, failed: lost } = result;
        if (cancelled) return s.destroy();
        created = s;
        setFailed(new Set(lost));
        if (lost.length === renditions.length) {
          setStatus({ kind: "failed", message: "The image could not be loaded. Try again later." });
          return;
        }
        const keys = renditions.filter((r) => !lost.includes(r.key)).map((r) => r.key);
        const shared = decodeViewState(window.location.search, keys);
        const first = keys[0];
        setRendition(shared.rendition ?? first);
        setCurtain(s.canCompare ? shared.curtain : null);
        setOverlays(new Set(shared.overlays.filter((k) => computeOverlayAvailability(geometry)[k].available)));
        s.setView(shared.rendition ?? first, s.canCompare ? shared.curtain : null);
        s.showRegion(shared.region, shared.rotationDeg);
        setStage(s);
        setStatus({ kind: "ready" });
        spoken.current = { zoom: s.zoomTimes().toFixed(1), rotation: Math.round(s.rotationDeg()) };
        ready.current = true;
        onSettled(s);
      })
      .catch(() => {
        if (!cancelled) setStatus({ kind: "failed", message: "The viewer could not start in this browser." });
      });
    return () => {
      cancelled = true;
      ready.current = false;
      clearTimeout(addressTimer.current);
      clearTimeout(announceTimer.current);
      created?.destroy();
      setStage(null);
    };
    // The viewer is built once per set of tile sources (not per array identity: a parent's re-render
    // must not rebuild it); later prop changes reach it through the effects below.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [sourcesKey]);

  useEffect(() => {
    if (!stage) return;
    stage.setView(rendition, curtain);
  }, [stage, rendition, curtain]);

  useEffect(() => {
    stage?.setMapShown(mapShown);
  }, [stage, mapShown]);

  useEffect(() => {
    if (stage) scheduleAddress(stage);
  }, [stage, rendition, curtain, overlays, scheduleAddress]);

  // The overlays in words, as they were when the view last settled.
  const overlayText = useMemo(() => {
    const frame = settledCount >= 0 ? stage?.getFrame() : null;
    return frame ? describeOverlayScene(buildOverlayScene(frame.transform, geometry, overlays, frame.widthPx)) : "";
  }, [stage, geometry, overlays, settledCount]);

  useEffect(() => {
    if (!stage) return;
    const canvas = stage.canvas;
    canvas.setAttribute("role", "application");
    canvas.setAttribute("aria-roledescription", "zoomable image");
    canvas.setAttribute("aria-label", title);
    canvas.setAttribute("aria-describedby", `${altId} ${keysHintId} ${overlayTextId}`);
  }, [stage, title, altId, keysHintId, overlayTextId]);

  // Full page: our own wrapper fills the window (and the screen where the browser allows), controls included.
  useEffect(() => {
    stage?.setPageScrollFriendly(!fullPage);
    if (!fullPage) return;
    const onKey = (e: KeyboardEvent) => e.key === "Escape" && setFullPage(false);
    const onFullscreen = () => !document.fullscreenElement && setFullPage(false);
    document.addEventListener("keydown", onKey);
    document.addEventListener("fullscreenchange", onFullscreen);
    return () => {
      document.removeEventListener("keydown", onKey);
      document.removeEventListener("fullscreenchange", onFullscreen);
    };
  }, [fullPage, stage]);

  function toggleFullPage() {
    if (!fullPage) {
      setFullPage(true);
      if (document.fullscreenEnabled && rootRef.current?.requestFullscreen) rootRef.current.requestFullscreen().catch(() => undefined);
    } else {
      setFullPage(false);
      if (document.fullscreenElement) document.exitFullscreen().catch(() => undefined);
    }
  }

  const left = renditions[0];
  const right = renditions[1];
  const compareReason =
    renditions.length < 2 ? "This plate has one rendition only." : failed.size > 0 ? "One of the renditions could not be loaded." : null;
  const disabled = status.kind !== "ready";

  return (
    <section
      ref={rootRef}
      aria-label={`${title}: image viewer`}
      className={cx("flex flex-col gap-3", fullPage && "fixed inset-0 z-50 overflow-auto bg-surface p-3")}
    >
      <ViewerToolbar
        disabled={disabled}
        fullPage={fullPage}
        zoomReadout={zoomReadout}
        rotationDeg={rotationDeg}
        onZoomIn={() => stage?.zoomBy(ZOOM_STEP)}
        onZoomOut={() => stage?.zoomBy(1 / ZOOM_STEP)}
        onHome={() => stage?.goHome()}
        onRotateLeft={() => stage?.rotateBy(-ROTATION_STEP_DEG)}
        onRotateRight={() => stage?.rotateBy(ROTATION_STEP_DEG)}
        onFullPage={toggleFullPage}
      />
      <div
        className={cx(
          "relative w-full overflow-hidden rounded-card border border-line bg-black",
          "has-[.openseadragon-canvas:focus-visible]:outline-3 has-[.openseadragon-canvas:focus-visible]:outline-offset-2 has-[.openseadragon-canvas:focus-visible]:outline-focus",
          // On a phone a square-ish stage leaves room to turn a wide image; on a desk most of the window.
          fullPage ? "min-h-80 flex-1" : "h-[min(70vh,100vw)] min-h-80 sm:h-[min(72vh,48rem)]",
        )}
      >
        <div ref={hostRef} className="absolute inset-0" />
        {stage ? <OverlayLayer stage={stage} geometry={geometry} overlays={overlays} /> : null}
        {stage && curtain !== null && left && right ? (
          <CurtainHandle fraction={curtain} leftLabel={left.label} rightLabel={right.label} onMove={setCurtain} />
        ) : null}
        {status.kind !== "ready" ? (
          <p className="absolute inset-0 grid place-items-center p-6 text-center text-sm text-ink-muted">
            {status.kind === "loading" ? "Loading the image…" : status.message}
          </p>
        ) : null}
      </div>
      <p id={altId} className="sr-only">
        {altText}
      </p>
      <p id={overlayTextId} className="sr-only">
        {overlayText}
      </p>
      <p aria-live="polite" className="sr-only">
        {announcement}
      </p>
      <p role={status.kind === "failed" ? "alert" : undefined} className="sr-only">
        {status.kind === "failed" ? status.message : ""}
      </p>
      <p className="text-sm text-ink-muted">
        <span className="pointer-coarse:hidden">Drag to move the image; hold Ctrl (⌘ on a Mac) and turn the wheel, or double-click, to zoom.</span>
        <span className="hidden pointer-coarse:inline">One finger scrolls the page; use two fingers to move and zoom the image.</span>
      </p>
      <div className="grid gap-x-8 gap-y-4 sm:grid-cols-2 lg:grid-cols-[auto_auto_1fr]">
        <div className="flex flex-col gap-4">
          <RenditionSwitch renditions={renditions} value={rendition} onChange={setRendition} comparing={curtain !== null} unavailable={failed} />
          <CurtainControl
            left={left}
            right={right}
            curtain={curtain}
            unavailableReason={compareReason}
            onToggle={(on) => setCurtain(on ? DEFAULT_CURTAIN : null)}
            onMove={setCurtain}
          />
        </div>
        {mapLayer ? (
          <MapLayerToggle layer={mapLayer} shown={mapShown} available={stage?.hasMap ?? false} disabled={disabled} onChange={setMapShown} />
        ) : null}
        <OverlayToggles
          availability={availability}
          on={overlays}
          onChange={(key, on) =>
            setOverlays((prev) => {
              const next = new Set(prev);
              if (on) next.add(key);
              else next.delete(key);
              return next;
            })
          }
        />
        <div className="flex flex-col gap-3">
          <ShareLink getLink={() => (stage ? linkFor(stage) : window.location.href)} disabled={disabled} />
          <KeyboardHelp hintId={keysHintId} />
        </div>
      </div>
    </section>
  );
}
