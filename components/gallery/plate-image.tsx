import { preload } from "react-dom";
import type { PublicPlateDto } from "@/lib/plates/public";
import { PlateViewer } from "@/components/viewer/plate-viewer";

const LABELS = { natural: "Natural", structure: "Structure" } as const;

/** The plate's zoomable image: tiles only, from the IIIF level-0 services of its renditions. */
export function PlateImage({ plate }: { plate: PublicPlateDto }) {
  // The first rendition's descriptor is fetched while the viewer's script still loads.
  const first = plate.renditionFiles[0];
  if (first) preload(first.iiifInfoUrl, { as: "fetch", crossOrigin: "anonymous" });
  return (
    <PlateViewer
      title={plate.title}
      altText={plate.altText}
      renditions={plate.renditionFiles.map((r) => ({ key: r.key, label: LABELS[r.key], tileSource: r.iiifInfoUrl, width: r.width, height: r.height }))}
      geometry={plate.geometry}
    />
  );
}
