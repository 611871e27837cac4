import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { PlatePage } from "@/components/gallery/plate-page";
import { loadPlate, plateMetadata } from "../../plate-route";

type Props = { params: Promise<{ slug: string; version: string }> };

function versionOf(text: string): number {
  // Digits only: "0x2" or "2e0" name no version.
  if (!/^[1-9]\d{0,5}$/.test(text)) notFound();
  return Number(text);
}

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { slug, version } = await params;
  return plateMetadata(slug, versionOf(version));
}

// A version's permanent link: it shows that version even after the plate moved on.
export default async function PlateVersionPage({ params }: Props) {
  const { slug, version } = await params;
  const { plate, society, credit } = await loadPlate(slug, versionOf(version));
  return <PlatePage plate={plate} society={society} credit={credit} />;
}
