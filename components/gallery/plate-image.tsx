import type { PublicPlateDto } from "@/lib/plates/public";

/** The plate's image. */
export function PlateImage({ plate }: { plate: PublicPlateDto }) {
  return (
    <figure className="flex flex-col gap-2">
      {/* eslint-disable-next-line @next/next/no-img-element -- replaced by the zoomable viewer */}
      <img src={plate.previewUrl} alt={plate.altText} className="w-full rounded-card bg-black object-contain" />
      <figcaption className="sr-only">{plate.altText}</figcaption>
    </figure>
  );
}
