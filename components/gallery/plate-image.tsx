import { preload } from "react-dom";
import type { PublicPlateDto } from "@/lib/plates/public";
import { PlateViewer } from "@/components/viewer/plate-viewer";

const LABELS = { natural: "Natural", structure: "Structure" } as const;

/** Who an input of a composite is, in the map's legend: the photographer and the lens. */
export function describeInput(input: NonNullable<PublicPlateDto["composite"]>["inputs"][number]): string {
  return input.kit ? `${input.photographer}, ${input.kit.focalMm} mm` : input.photographer;
}

/** The plate's zoomable image: tiles only, from the IIIF level-0 services of its renditions; a composite's adds its contribution map as a layer. */
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
      mapLayer={
        plate.composite
          ? {
              label: "Show where each input contributes",
              url: plate.composite.contributionUrl,
              legend: plate.composite.inputs.map((i) => ({
                label: `${describeInput(i)}${i.weightShare !== null ? `: ${(100 * i.weightShare).toFixed(1)} % of the light` : ""}`,
                colour: i.colour ?? "#888888",
              })),
            }
          : undefined
      }
    />
  );
}
