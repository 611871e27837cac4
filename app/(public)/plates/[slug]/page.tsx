import type { Metadata } from "next";
import { PlatePage } from "@/components/gallery/plate-page";
import { loadPlate, plateMetadata } from "./plate-route";

type Props = { params: Promise<{ slug: string }> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  return plateMetadata((await params).slug);
}

export default async function PlateRoutePage({ params }: Props) {
  const { plate, society, credit } = await loadPlate((await params).slug);
  return <PlatePage plate={plate} society={society} credit={credit} />;
}
