import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { KitForm } from "@/components/kits/kit-form";
import { PageTitle } from "@/components/page-title";
import { SolarSafetyNote } from "@/components/safety/solar-safety-note";
import { createKitAction } from "../actions";

export const metadata: Metadata = { title: "New kit" };

export default async function NewKitPage() {
  await requirePagePermission("studio:use", "/studio/kits/new");
  return (
    <>
      <PageTitle title="New kit" lead="The numbers come from the camera's and the lens's specifications." />
      <SolarSafetyNote className="mb-6" />
      <KitForm
        action={createKitAction}
        submitLabel="Save kit"
        initial={{
          name: "",
          camera: "",
          sensorWidthMm: "",
          sensorHeightMm: "",
          pixelPitchUm: "",
          focalMm: "",
          teleconverter: 1,
          fNumber: "",
          mount: "equatorial",
          flipHorizontal: false,
          flipVertical: false,
          notes: "",
        }}
      />
    </>
  );
}
