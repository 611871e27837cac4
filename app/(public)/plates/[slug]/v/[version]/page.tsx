import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { PlatePage } from "@/components/gallery/plate-page";
import { loadPlate, plateMetadata } from "../../plate-route";

type Props = { params: Promise<{ slug: string; version: string }> };

function versionOf(text: string): number {
  const v = Number(text);
  if (!Number.isInteger(v) || v < 1) notFound();
  return v;
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
